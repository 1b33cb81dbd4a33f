import { RungsInputError } from '../../errors.ts';
import type { StudyDeclaration } from '../declaration.ts';
import type { StudyProblem } from '../problem.ts';
import { externalDiscretization } from './external.ts';
import { customDiscretization } from './custom.ts';
import { scalarLagrange } from './scalar-lagrange.ts';
import { builtInElasticity } from './elasticity.ts';
import { builtInStokes } from './stokes.ts';
import { builtInNonlinearDiffusion } from './nonlinear-diffusion.ts';
import { builtInMixedElasticity } from './mixed-elasticity.ts';
import { builtInHeat } from './heat.ts';
import type { LevelDiscretization } from './types.ts';

/** The discretization object of a study: the one place that looks at its kind and its equation. */
export function levelDiscretization(decl: StudyDeclaration, problem: StudyProblem, file: string): LevelDiscretization {
  const disc = decl.discretization;
  if (disc.kind === 'external') return externalDiscretization(disc);
  if (disc.kind === 'custom') return customDiscretization(disc);
  const preset = problem.pde.preset?.name;
  switch (preset) {
    case 'diffusion-convection-reaction': return scalarLagrange(disc);
    case 'linear-elasticity': return builtInElasticity(disc);
    case 'stokes': return builtInStokes(disc);
    case 'nonlinear-diffusion': return builtInNonlinearDiffusion(disc);
    case 'nearly-incompressible-elasticity': return builtInMixedElasticity(disc);
    case 'heat': return builtInHeat(disc);
    default:
      throw new RungsInputError(`${file} (study '${decl.name}'): discretization: rungs's own elements solve the presets diffusionConvectionReaction, heat, linearElasticity, nearlyIncompressibleElasticity, stokes and nonlinearDiffusion; for ${problem.pde.label ?? 'a pde of your own'} use external({ command, ... })`, file);
  }
}
