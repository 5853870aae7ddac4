"""Run by ParaView's pvpython (not by murk's tests' Python): opens an XDMF file with ParaView's
XDMFReader and prints, as JSON, each block's cell and point counts and the range of each of
its cell arrays. Usage: pvpython read_xdmf_paraview.py FILE.xdmf
"""
import json, sys
from paraview.simple import XDMFReader, servermanager
from paraview import vtk
reader = XDMFReader(FileNames=[sys.argv[1]])
reader.UpdatePipeline()
data = servermanager.Fetch(reader)
blocks = []
if data.IsA("vtkCompositeDataSet"):
    it = data.NewIterator()
    it.InitTraversal()
    while not it.IsDoneWithTraversal():
        blocks.append(it.GetCurrentDataObject())
        it.GoToNextItem()
else:
    blocks.append(data)
out = []
for b in blocks:
    cd = b.GetCellData()
    arrays = {cd.GetArrayName(i): list(cd.GetArray(i).GetRange()) for i in range(cd.GetNumberOfArrays())}
    out.append({"cells": b.GetNumberOfCells(), "points": b.GetNumberOfPoints(), "arrays": arrays})
print(json.dumps(out))
