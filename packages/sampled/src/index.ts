// Public API of @loopwright/sampled.
export {};
