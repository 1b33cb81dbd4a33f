/**
 * Writes test VTK files of a nodal field on a rungs mesh, following the VTK node order as documented by Kitware
 * ("VTK File Formats"; vtkQuadraticTriangle / vtkQuadraticTetra class notes): corners, then the mid-edge nodes of
 * triangle edges (0,1), (1,2), (2,0), of tetrahedron edges (0,1), (1,2), (2,0), (0,3), (1,3), (2,3), the quadratic
 * edge's mid node last, the biquadratic quad's edges (0,1), (1,2), (2,3), (3,0) and then its centre. Mid-edge points are shared by neighbouring cells (a continuous field). This is written
 * from the VTK documentation, not from rungs's element numbering, so that a reader test compares two sources.
 */
import type { Mesh } from '../../src/mesh/types.ts';

const VTK_EDGES: Record<string, [number, number][]> = {
  interval: [[0, 1]],
  triangle: [[0, 1], [1, 2], [2, 0]],
  tetrahedron: [[0, 1], [1, 2], [2, 0], [0, 3], [1, 3], [2, 3]],
  quadrilateral: [[0, 1], [1, 2], [2, 3], [3, 0]],
};
const LINEAR_TYPE: Record<string, number> = { interval: 3, triangle: 5, tetrahedron: 10, quadrilateral: 9 };
const QUADRATIC_TYPE: Record<string, number> = { interval: 21, triangle: 22, tetrahedron: 24, quadrilateral: 28 };

export interface NodalGrid {
  points: number[][]; // 3 coordinates each
  cells: number[][];
  type: number;
  values: number[];
}

/** Corners (and mid-edge nodes for degree 2) of every cell with u at each point. `flip` lists cells to write with
 *  reversed orientation (corners 1 and 2 swapped, mid nodes following their edges, as VTK's order demands). */
export function nodalGrid(mesh: Mesh, degree: 1 | 2, u: (x: number, y: number, z: number) => number, flip: Set<number> = new Set()): NodalGrid {
  const dim = mesh.dim;
  const points: number[][] = [];
  for (let v = 0; v < mesh.nVertices; v++) {
    const p = [0, 0, 0];
    for (let d = 0; d < dim; d++) p[d] = mesh.coords[v * dim + d]!;
    points.push(p);
  }
  const mid = new Map<string, number>();
  const cells: number[][] = [];
  const vpc = mesh.verticesPerCell;
  for (let c = 0; c < mesh.nCells; c++) {
    let corners = Array.from(mesh.cells.subarray(c * vpc, (c + 1) * vpc));
    if (flip.has(c)) {
      corners = mesh.cellKind === 'interval' ? [corners[1]!, corners[0]!]
        : mesh.cellKind === 'quadrilateral' ? [corners[0]!, corners[3]!, corners[2]!, corners[1]!]
          : [corners[0]!, corners[2]!, corners[1]!, ...corners.slice(3)];
    }
    const cell = [...corners];
    if (degree === 2) {
      for (const [a, b] of VTK_EDGES[mesh.cellKind]!) {
        const va = corners[a]!, vb = corners[b]!;
        const key = va < vb ? `${va},${vb}` : `${vb},${va}`;
        let id = mid.get(key);
        if (id === undefined) {
          id = points.length;
          points.push(points[va]!.map((x, d) => 0.5 * (x + points[vb]![d]!)));
          mid.set(key, id);
        }
        cell.push(id);
      }
      if (mesh.cellKind === 'quadrilateral') {
        // VTK_BIQUADRATIC_QUAD: the centre node comes last.
        cell.push(points.length);
        points.push([0, 1, 2].map((d) => corners.reduce((sum, v) => sum + points[v]![d]!, 0) / 4));
      }
    }
    cells.push(cell);
  }
  const type = degree === 2 ? QUADRATIC_TYPE[mesh.cellKind]! : LINEAR_TYPE[mesh.cellKind]!;
  return { points, cells, type, values: points.map((p) => u(p[0]!, p[1]!, p[2]!)) };
}

const num = (x: number) => String(x);

/** Legacy ASCII VTK; layout 'classic' (CELLS n size with counts) or '5.1' (OFFSETS / CONNECTIVITY). */
export function legacyVtk(g: NodalGrid, layout: 'classic' | '5.1' = 'classic', name = 'temperature'): string {
  const parts: string[][] = [[`# vtk DataFile Version ${layout === '5.1' ? '5.1' : '3.0'}`, 'test grid', 'ASCII', 'DATASET UNSTRUCTURED_GRID']];
  parts.push([`POINTS ${g.points.length} double`], g.points.map((p) => p.map(num).join(' ')));
  if (layout === 'classic') {
    const size = g.cells.reduce((s, c) => s + c.length + 1, 0);
    parts.push([`CELLS ${g.cells.length} ${size}`], g.cells.map((c) => `${c.length} ${c.join(' ')}`));
  } else {
    const offsets = [0];
    for (const c of g.cells) offsets.push(offsets[offsets.length - 1]! + c.length);
    parts.push([`CELLS ${offsets.length} ${offsets[offsets.length - 1]}`, 'OFFSETS vtktypeint64', offsets.join(' '), 'CONNECTIVITY vtktypeint64'], g.cells.map((c) => c.join(' ')));
  }
  parts.push([`CELL_TYPES ${g.cells.length}`], g.cells.map(() => String(g.type)));
  parts.push([`POINT_DATA ${g.points.length}`, `SCALARS ${name} double 1`, 'LOOKUP_TABLE default'], g.values.map(num));
  return parts.map((p) => p.join('\n')).join('\n') + '\n';
}

/** VTK XML unstructured grid with ASCII DataArrays (offsets are the END of each cell's connectivity). */
export function vtuText(g: NodalGrid, name = 'temperature'): string {
  const ends: number[] = [];
  let total = 0;
  for (const c of g.cells) { total += c.length; ends.push(total); }
  return ([] as string[]).concat(
    '<?xml version="1.0"?>',
    '<!-- written for a reader test -->',
    '<VTKFile type="UnstructuredGrid" version="1.0" byte_order="LittleEndian">',
    '  <UnstructuredGrid>',
    `    <Piece NumberOfPoints="${g.points.length}" NumberOfCells="${g.cells.length}">`,
    `      <PointData Scalars="${name}">`,
    `        <DataArray type="Float64" Name="${name}" format="ascii">`,
    g.values.map(num),
    '        </DataArray>',
    '      </PointData>',
    '      <Points>',
    '        <DataArray type="Float64" NumberOfComponents="3" format="ascii">',
    g.points.map((p) => p.map(num).join(' ')),
    '        </DataArray>',
    '      </Points>',
    '      <Cells>',
    '        <DataArray type="Int64" Name="connectivity" format="ascii">',
    g.cells.map((c) => c.join(' ')),
    '        </DataArray>',
    '        <DataArray type="Int64" Name="offsets" format="ascii">',
    ends.join(' '),
    '        </DataArray>',
    '        <DataArray type="UInt8" Name="types" format="ascii">',
    g.cells.map(() => String(g.type)).join(' '),
    '        </DataArray>',
    '      </Cells>',
    '    </Piece>',
    '  </UnstructuredGrid>',
    '</VTKFile>',
  ).join('\n') + '\n';
}
