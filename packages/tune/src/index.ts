// Public API of @loopwright/tune.
export {};
