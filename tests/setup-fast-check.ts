import fc from 'fast-check';

// Property tests run with one fixed seed, so that a run on CI is the run a developer repeats.
// Set LOOPWRIGHT_FC_SEED=random (or a number) to explore other inputs locally.
const env = process.env.LOOPWRIGHT_FC_SEED;
if (env !== 'random') fc.configureGlobal({ seed: env ? Number(env) : 20261202 });
