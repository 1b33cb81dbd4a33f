/** The URL of a module beside `moduleUrl` (a .ts file from the source tree, a .js file once compiled): the task
 *  modules that worker threads import by URL (the cell team's, src/fem/team/team.ts; the seam sweeps', src/linalg/
 *  amg/seam-task.ts). */
export function taskUrl(moduleUrl: string, stem: string): string {
  return new URL(`./${stem}${moduleUrl.endsWith('.ts') ? '.ts' : '.js'}`, moduleUrl).href;
}
