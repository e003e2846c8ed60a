/**
 * Replies of one slider step land together. The analysis channel answers within a millisecond or
 * two and the run a few milliseconds later; applied one by one, each reply renders and paints the
 * views on its own, and the second waits behind the first one's frame. A reply that arrives while
 * another channel of its generation is still computing — one expected soon — is held until the
 * last expected reply arrives or `waitMs` has passed, and the held replies are applied in one
 * store update: one render and one paint per step. Whether a channel is expected soon is the
 * caller's call (the driver: its last computation took under `waitMs`), so a long run never holds
 * up the locus markers.
 */
export type PatchMaker<S> = (s: S) => Partial<S>;

export class ReplyBatch<S> {
  private makers: PatchMaker<S>[] = [];
  private timer: ReturnType<typeof setTimeout> | null = null;

  constructor(
    private readonly get: () => S,
    private readonly set: (patch: Partial<S>) => void,
    readonly waitMs: number,
  ) {}

  /** A reply's patch, made from the state it is applied to; `wait`: another reply is expected within waitMs. */
  add(make: PatchMaker<S>, wait: boolean): void {
    this.makers.push(make);
    if (!wait) this.flush();
    else this.timer ??= setTimeout(() => this.flush(), this.waitMs);
  }

  /** Applies the held patches in arrival order, each made from the state the ones before it left. */
  flush(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    const makers = this.makers;
    this.makers = [];
    if (makers.length === 0) return;
    const merged: Partial<S> = {};
    for (const make of makers) Object.assign(merged, make({ ...this.get(), ...merged }));
    this.set(merged);
  }

  /** Drops what is held (the driver stops). */
  dispose(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    this.makers = [];
  }
}
