import { z } from 'zod';

/**
 * The baseline file: plain JSON with sorted keys and one study per key, so that a re-recorded baseline diffs line by
 * line. Per study: the ladder it was recorded on (level count, h and dofs per level), the relative tolerance, the hash
 * of the study's declaration (`declaration`, "sha256:…"; absent in files recorded before it existed), and per norm
 * the error on every level (with that level's h and dofs, and whether it sat on an error floor).
 */
export const BASELINE_FORMAT = 'rungs-baseline';
export const BASELINE_VERSION = 1;
export const DEFAULT_REL_TOL = 0.05;

const levelSchema = z.object({
  level: z.number().int().positive(),
  h: z.number().positive(),
  dofs: z.number().int().nonnegative(),
  error: z.number().nonnegative(),
  floor: z.boolean().optional(),
});

const studySchema = z.object({
  ladder: z.object({
    levels: z.number().int().positive(),
    h: z.array(z.number().positive()),
    dofs: z.array(z.number().int().nonnegative()),
  }),
  relTol: z.number().positive(),
  recordedAt: z.string().optional(),
  declaration: z.string().regex(/^sha256:[0-9a-f]{64}$/, 'expected "sha256:" and 64 hex digits').optional(),
  norms: z.record(z.string(), z.array(levelSchema)),
});

export const baselineSchema = z.object({
  format: z.literal(BASELINE_FORMAT),
  version: z.literal(BASELINE_VERSION),
  studies: z.record(z.string(), studySchema),
});

export type BaselineLevel = z.infer<typeof levelSchema>;
export type BaselineStudy = z.infer<typeof studySchema>;
export type Baseline = z.infer<typeof baselineSchema>;
