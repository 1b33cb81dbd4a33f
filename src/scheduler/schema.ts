import { z } from 'zod';

/** '512M', '4G', '1.5T', '800K' (Slurm's units, powers of 1024) or a plain number of megabytes. */
export const MEMORY_TEXT = /^\s*(\d+(?:\.\d+)?)\s*([KMGT])?i?B?\s*$/i;

const perLevel = <T extends z.ZodTypeAny>(one: T, what: string) => z.union([
  one,
  z.array(one).min(1),
  z.object({ finest: one, scale: z.enum(['dofs', 'n']), min: one.optional() }).strict(),
], { message: `expected ${what}, a list with one per level, or { finest: …, scale: 'dofs' | 'n', min?: … }` });

const memory = z.union([
  z.number().positive().finite(),
  z.string().regex(MEMORY_TEXT, "expected megabytes or text such as '512M' or '4G'"),
]);

/** The zod fragment of external({ scheduler: { … } }) (src/scheduler/types.ts SchedulerSettings). */
export const schedulerSettingsSchema = z.object({
  kind: z.enum(['slurm', 'local'], { message: "expected 'slurm' (each level a Slurm job) or 'local' (each level a process here)" }),
  partition: z.string().regex(/^[A-Za-z0-9_.,-]+$/, 'expected a partition name such as "compute"').optional(),
  tasks: perLevel(z.number().int().positive(), 'a whole number of tasks').optional(),
  memory: perLevel(memory, "megabytes or text such as '4G'").optional(),
  minutes: perLevel(z.number().int().positive(), 'whole minutes').optional(),
  sbatch: z.array(z.string().regex(/^--?[A-Za-z]/, "expected sbatch options such as '--account=kiln'")).optional(),
  errors: z.enum(['here', 'job'], { message: "expected 'here' (rungs reads the VTK files back) or 'job' (the errors are integrated in the level's job)" }).optional(),
  onStop: z.enum(['keep', 'cancel'], { message: "expected 'keep' (jobs run on; --resume collects them) or 'cancel'" }).optional(),
}).strict();
