import { RungsInputError } from '../../errors.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import type { MixedSpace, VectorSpace } from './types.ts';

/** The space of fields with `components` components in a scalar Lagrange space. */
export function vectorSpace(scalar: FunctionSpace, components: number): VectorSpace {
  if (!(Number.isInteger(components) && components >= 1)) throw new RungsInputError(`a space needs a positive whole number of components, got ${components}`);
  return { scalar, components, nDofs: scalar.nDofs * components };
}

/** One numbering for several spaces on the same mesh: fields in the order given. */
export function mixedSpace(parts: { name: string; space: VectorSpace }[]): MixedSpace {
  if (parts.length === 0) throw new RungsInputError('a mixed space needs at least one field');
  const mesh = parts[0].space.scalar.mesh;
  for (const p of parts) {
    if (p.space.scalar.mesh !== mesh) throw new RungsInputError(`field '${p.name}' lives on another mesh; the fields of a mixed space share one mesh`);
  }
  let offset = 0, localOffset = 0;
  const fields = parts.map((p) => {
    const nLocal = p.space.scalar.element.nDofs * p.space.components;
    const f = { name: p.name, space: p.space, offset, localOffset, nLocal };
    offset += p.space.nDofs;
    localOffset += nLocal;
    return f;
  });
  const nLocal = localOffset;
  const nCells = mesh.nCells;
  const cellDofs = new Int32Array(nCells * nLocal);
  for (const f of fields) {
    const { scalar, components: nc } = f.space;
    const n = scalar.element.nDofs;
    const sd = scalar.cellDofs;
    for (let c = 0; c < nCells; c++) {
      const o = c * nLocal + f.localOffset;
      for (let a = 0; a < n; a++) {
        const g = f.offset + sd[c * n + a] * nc;
        for (let i = 0; i < nc; i++) cellDofs[o + a * nc + i] = g + i;
      }
    }
  }
  return { mesh, fields, nDofs: offset, nLocal, cellDofs };
}

/** The field of a mixed space with this name. */
export function fieldIndex(space: MixedSpace, name: string): number {
  const i = space.fields.findIndex((f) => f.name === name);
  if (i < 0) throw new RungsInputError(`no field '${name}' in this space; fields: ${space.fields.map((f) => f.name).join(', ')}`);
  return i;
}

/** The unknowns of one field, copied out of a vector over the whole mixed space. */
export function fieldValues(space: MixedSpace, field: number, x: Float64Array): Float64Array {
  const f = space.fields[field];
  return x.slice(f.offset, f.offset + f.space.nDofs);
}

/** Scalar space shorthand: the given Lagrange space as a one-field mixed space. */
export function singleField(name: string, scalar: FunctionSpace, components = 1): MixedSpace {
  return mixedSpace([{ name, space: vectorSpace(scalar, components) }]);
}
