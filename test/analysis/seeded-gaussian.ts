// Test helper: reproducible standard-normal draws. Marsaglia's xorshift32 (J. Stat. Softw. 8(14), 2003) for
// uniforms and the Box–Muller transform (Box & Muller 1958) for normals.

export function seededGaussian(seed: number): () => number {
  let state = (seed >>> 0) || 0x9e3779b9;
  const uniform = (): number => {
    state ^= state << 13;
    state >>>= 0;
    state ^= state >>> 17;
    state ^= state << 5;
    state >>>= 0;
    return (state + 0.5) / 4294967296;
  };
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    const radius = Math.sqrt(-2 * Math.log(uniform()));
    const angle = 2 * Math.PI * uniform();
    spare = radius * Math.sin(angle);
    return radius * Math.cos(angle);
  };
}
