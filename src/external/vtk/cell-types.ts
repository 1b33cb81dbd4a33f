// VTK cell types rungs reads, with VTK's node order. Source: "VTK File Formats", Kitware (VTK User's Guide,
// figures of the linear and non-linear cell types) and the class notes of vtkQuadraticTriangle / vtkQuadraticTetra:
// corners first, then one mid-edge node per edge — triangle edges (0,1), (1,2), (2,0); tetrahedron edges
// (0,1), (1,2), (2,0), (0,3), (1,3), (2,3); the quadratic edge has its mid node last; the biquadratic quad
// has the edges (0,1), (1,2), (2,3), (3,0) and then its centre node.
import type { CellKind } from '../../mesh/types.ts';

export interface VtkCellType {
  id: number;
  name: string;
  cellKind: Exclude<CellKind, 'hexahedron'>; // no hexahedral VTK types are read yet
  degree: 1 | 2;
  /** Nodes per cell. */
  nodes: number;
  corners: number;
  /** Mid-edge nodes: [corner a, corner b, node index] in VTK's order. */
  edgeNodes: [number, number, number][];
  /** Interior nodes (the biquadratic quad's centre). */
  interiorNodes: number[];
}

const TRIANGLE_EDGES: [number, number][] = [[0, 1], [1, 2], [2, 0]];
const TETRA_EDGES: [number, number][] = [[0, 1], [1, 2], [2, 0], [0, 3], [1, 3], [2, 3]];
const QUAD_EDGES: [number, number][] = [[0, 1], [1, 2], [2, 3], [3, 0]];
const withNodes = (edges: [number, number][], first: number): [number, number, number][] =>
  edges.map(([a, b], k) => [a, b, first + k]);

export const VTK_CELL_TYPES: Readonly<Record<number, VtkCellType>> = {
  3: { id: 3, name: 'VTK_LINE', cellKind: 'interval', degree: 1, nodes: 2, corners: 2, edgeNodes: [], interiorNodes: [] },
  5: { id: 5, name: 'VTK_TRIANGLE', cellKind: 'triangle', degree: 1, nodes: 3, corners: 3, edgeNodes: [], interiorNodes: [] },
  9: { id: 9, name: 'VTK_QUAD', cellKind: 'quadrilateral', degree: 1, nodes: 4, corners: 4, edgeNodes: [], interiorNodes: [] },
  10: { id: 10, name: 'VTK_TETRA', cellKind: 'tetrahedron', degree: 1, nodes: 4, corners: 4, edgeNodes: [], interiorNodes: [] },
  // The quadratic edge's mid node is its interior node in rungs's 1D numbering (vertices, then interior).
  21: { id: 21, name: 'VTK_QUADRATIC_EDGE', cellKind: 'interval', degree: 2, nodes: 3, corners: 2, edgeNodes: [], interiorNodes: [2] },
  22: { id: 22, name: 'VTK_QUADRATIC_TRIANGLE', cellKind: 'triangle', degree: 2, nodes: 6, corners: 3, edgeNodes: withNodes(TRIANGLE_EDGES, 3), interiorNodes: [] },
  24: { id: 24, name: 'VTK_QUADRATIC_TETRA', cellKind: 'tetrahedron', degree: 2, nodes: 10, corners: 4, edgeNodes: withNodes(TETRA_EDGES, 4), interiorNodes: [] },
  28: { id: 28, name: 'VTK_BIQUADRATIC_QUAD', cellKind: 'quadrilateral', degree: 2, nodes: 9, corners: 4, edgeNodes: withNodes(QUAD_EDGES, 4), interiorNodes: [8] },
};

/** Names of other VTK cell types, for messages (vtkCellType.h numbering, from memory). */
const OTHER_NAMES: Record<number, string> = {
  0: 'VTK_EMPTY_CELL', 1: 'VTK_VERTEX', 2: 'VTK_POLY_VERTEX', 4: 'VTK_POLY_LINE', 6: 'VTK_TRIANGLE_STRIP',
  7: 'VTK_POLYGON', 8: 'VTK_PIXEL', 11: 'VTK_VOXEL', 12: 'VTK_HEXAHEDRON', 13: 'VTK_WEDGE', 14: 'VTK_PYRAMID',
  23: 'VTK_QUADRATIC_QUAD', 25: 'VTK_QUADRATIC_HEXAHEDRON', 26: 'VTK_QUADRATIC_WEDGE', 27: 'VTK_QUADRATIC_PYRAMID',
  34: 'VTK_TRIQUADRATIC_PYRAMID', 35: 'VTK_CUBIC_LINE', 68: 'VTK_LAGRANGE_CURVE', 69: 'VTK_LAGRANGE_TRIANGLE',
  70: 'VTK_LAGRANGE_QUADRILATERAL', 71: 'VTK_LAGRANGE_TETRAHEDRON',
};

export function vtkCellTypeName(id: number): string {
  return VTK_CELL_TYPES[id]?.name ?? OTHER_NAMES[id] ?? `unknown type ${id}`;
}

export const SUPPORTED_CELL_TYPES_TEXT = Object.values(VTK_CELL_TYPES).map((t) => `${t.name} (${t.id})`).join(', ');
