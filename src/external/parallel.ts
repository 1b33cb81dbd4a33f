/**
 * Runs tasks with at most `jobs` of them under way at once and returns their results in task order.
 * After a task fails no new task starts; the ones already running are awaited, then the failure of the
 * lowest-numbered failed task is thrown (so the error does not depend on timing). `onDone` hears each
 * result as soon as it is known (to write a finished level at once).
 */
export async function runLevelsInParallel<T>(
  tasks: ReadonlyArray<() => Promise<T>>,
  jobs: number,
  onDone?: (index: number, value: T) => void,
): Promise<T[]> {
  const width = Math.max(1, Math.min(Number.isFinite(jobs) ? Math.floor(jobs) : 1, tasks.length || 1));
  const results = new Array<T>(tasks.length);
  const failures: { index: number; error: unknown }[] = [];
  let next = 0;
  const worker = async (): Promise<void> => {
    while (failures.length === 0 && next < tasks.length) {
      const index = next++;
      try {
        const value = await tasks[index]!();
        results[index] = value;
        onDone?.(index, value);
      } catch (error) {
        failures.push({ index, error });
      }
    }
  };
  await Promise.all(Array.from({ length: width }, worker));
  if (failures.length) {
    failures.sort((a, b) => a.index - b.index);
    throw failures[0]!.error;
  }
  return results;
}
