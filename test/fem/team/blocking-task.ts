// A task for tests of the cell team: it marks gate[1] once a worker holds it, then blocks until gate[0] is set
// (bounded, a guard against a hang only), so that a test can keep the worker busy while it checks what the main thread
// does meanwhile.
export function prepare(input: unknown): (part: number) => void {
  const gate = (input as { gate: Int32Array }).gate;
  return () => {
    Atomics.store(gate, 1, 1);
    Atomics.notify(gate, 1);
    const until = Date.now() + 120_000;
    while (Atomics.load(gate, 0) === 0 && Date.now() < until) Atomics.wait(gate, 0, 0, 50);
  };
}
