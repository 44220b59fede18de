"""The CAD edge: the only package that imports CadQuery / OCP.

Import it lazily (inside functions) from the CLI so ``geomgen --help`` stays instant.
"""
