// Entry of a pool worker thread: registers tsx's loader in this thread, then hands tasks to worker.ts.
import { register } from 'tsx/esm/api';

register();
const mod = await import('./worker.ts');
export default mod.default;
