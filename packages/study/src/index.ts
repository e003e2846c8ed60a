// Public API of @loopwright/study.
export {};
