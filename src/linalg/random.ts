// One seeded generator for the whole project lives in src/mesh/random.ts; linalg re-exports it for its tests.
export { mulberry32 } from '../mesh/random.ts';
