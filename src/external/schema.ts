import { z } from 'zod';
import { schedulerSettingsSchema } from '../scheduler/schema.ts';

/** The zod fragment of external({ … }) for the study schema's discretization union (discriminated by kind). */
export const externalDiscretizationSchema = z.object({
  kind: z.literal('external'),
  command: z.union([
    z.string().min(1, 'expected a command such as "python3 solver.py --n {n} --out {out}"'),
    z.array(z.string()).min(1, 'expected the program and its arguments'),
  ], { message: 'expected a command string or an array of argv words' }),
  output: z.enum(['errors', 'vtk'], { message: "expected 'errors' (the solver writes errors.json or errors.csv) or 'vtk' (it writes solution.vtk or solution.vtu)" }),
  degree: z.number().int().min(1).max(3).optional(),
  timeoutSeconds: z.number().positive().finite().optional(),
  maxOutputBytes: z.number().int({ message: 'expected a whole number of bytes, such as 2e9' }).positive({ message: 'expected a positive number of bytes, such as 2e9' }).optional(),
  label: z.string().min(1).optional(),
  field: z.string().min(1).optional(),
  fields: z.record(z.string(), z.union([
    z.string().min(1),
    z.object({ array: z.string().min(1), degree: z.number().int().min(1).max(2).optional() }).strict(),
  ], { message: "expected the VTK array's name, or { array: '<name>', degree: 1 }" }), { message: "expected the VTK array of each field, such as { u: 'displacement', p: 'pressure' }" }).optional(),
  cwd: z.string().min(1).optional(),
  env: z.record(z.string(), z.string()).optional(),
  preflight: z.union([z.string().min(1), z.array(z.string()).min(1)], { message: 'expected a command string or argv words that writes {out}/preflight.csv' }).optional(),
  scheduler: schedulerSettingsSchema.optional(),
}).strict();

/** Quantity names for the study's `quantities` field (GCI of each from the three finest levels). */
export const quantityNamesSchema = z.array(z.string().regex(/^[A-Za-z_][A-Za-z0-9_.-]*$/, 'expected a name of letters, digits, "_", "." or "-"')).min(1);
