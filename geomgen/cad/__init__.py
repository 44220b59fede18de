"""The CAD edge: the only package that imports OCP (the OpenCASCADE kernel).

Import it lazily (inside functions) from the CLI so ``geomgen --help`` stays instant.
"""

from OCP.Message import Message, Message_Gravity


def _quiet_kernel() -> None:
    """Keep the kernel's transfer statistics off the user's terminal (failures still print)."""
    printers = Message.DefaultMessenger_s().Printers()
    for i in range(1, printers.Length() + 1):
        printers.Value(i).SetTraceLevel(Message_Gravity.Message_Fail)


_quiet_kernel()
