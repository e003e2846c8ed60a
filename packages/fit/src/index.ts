// Public API of @loopwright/fit.
export {};
