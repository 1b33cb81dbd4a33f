// The task of CellTeam.warm: each part waits (bounded) until every worker holds a part, so that warm() returns only
// when all workers have loaded and taken one.
export function prepare(input: unknown): (part: number) => void {
  const { sab, n } = input as { sab: SharedArrayBuffer; n: number };
  const count = new Int32Array(sab);
  return () => {
    Atomics.add(count, 0, 1);
    const until = Date.now() + 10_000;
    for (let c = Atomics.load(count, 0); c < n && Date.now() < until; c = Atomics.load(count, 0)) Atomics.wait(count, 0, c, 50);
    Atomics.notify(count, 0);
  };
}
