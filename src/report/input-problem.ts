/** A study that could not run because its input was wrong; reports list it beside the studies that ran. */
export interface InputProblem {
  study: string;
  file: string;
  message: string;
}
