"""Element matrices, one small module per element kind.

Local DOF order of every element is given in its module; the global order per
node is ``[x, y, a, b]`` (translations and slopes a = dx/dz, b = dy/dz).
"""
