"""Read written files back through the kernel (STEP) for measurement and tests.

Nothing here knows the spec: it sees only what is in the file.
"""

from __future__ import annotations

from pathlib import Path

from OCP.IFSelect import IFSelect_RetDone
from OCP.STEPCAFControl import STEPCAFControl_Reader
from OCP.TCollection import TCollection_ExtendedString
from OCP.TDataStd import TDataStd_Name
from OCP.TDF import TDF_LabelSequence
from OCP.TDocStd import TDocStd_Document
from OCP.TopAbs import TopAbs_SOLID
from OCP.TopExp import TopExp_Explorer
from OCP.TopoDS import TopoDS
from OCP.XCAFDoc import XCAFDoc_DocumentTool

from ..errors import ExportError


def read_step(path) -> list[tuple[str, object]]:
    """(product name, TopoDS_Solid) for every solid of a STEP file, in file order."""
    doc = TDocStd_Document(TCollection_ExtendedString("geomgen-read"))
    reader = STEPCAFControl_Reader()
    reader.SetNameMode(True)
    if reader.ReadFile(str(Path(path))) != IFSelect_RetDone or not reader.Transfer(doc):
        raise ExportError(f"{path}: not a readable STEP file")
    tool = XCAFDoc_DocumentTool.ShapeTool_s(doc.Main())
    labels = TDF_LabelSequence()
    tool.GetFreeShapes(labels)
    out = []

    def visit(label):
        if tool.IsAssembly_s(label):
            comps = TDF_LabelSequence()
            tool.GetComponents_s(label, comps)
            for i in range(1, comps.Length() + 1):
                visit(comps.Value(i))
            return
        shape = tool.GetShape_s(label)
        ref = label
        if tool.IsReference_s(label):
            from OCP.TDF import TDF_Label

            ref = TDF_Label()
            tool.GetReferredShape_s(label, ref)
        attr = TDataStd_Name()
        name = attr.Get().ToExtString() if ref.FindAttribute(TDataStd_Name.GetID_s(), attr) else ""
        exp = TopExp_Explorer(shape, TopAbs_SOLID)
        while exp.More():
            out.append((name, TopoDS.Solid_s(exp.Current())))
            exp.Next()

    for i in range(1, labels.Length() + 1):
        visit(labels.Value(i))
    return out
