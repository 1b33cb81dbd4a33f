/** A coefficient or datum at a physical point, written into out (one entry for a scalar). */
export type PointData = (x: number, y: number, z: number, out: Float64Array) => void;
/** Boundary data that depend on the outward unit normal too. */
export type NormalData = (x: number, y: number, z: number, nx: number, ny: number, nz: number, out: Float64Array) => void;
