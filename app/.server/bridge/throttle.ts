// The bridge's two small throttles: a token bucket per topic (held back, never dropped) and a gate
// that lets the same refusal reason be recorded once in a while per key.

/** The same reason is recorded at most once in this long per topic and device, so a chatty topic cannot fill the record. */
export const RECORD_EVERY_MS = 10 * 60_000;
/** Keys each throttle remembers at most; past that it forgets them all (bounded memory). */
export const MAX_THROTTLE_KEYS = 2000;

type Bucket = { tokens: number; at: number };

/** A burst of `burst` messages per key, then `perSecond`. */
export class TopicPacer {
  private buckets = new Map<string, Bucket>();

  constructor(
    private readonly burst: number,
    private readonly perSecond: number,
  ) {}

  clear() {
    this.buckets.clear();
  }

  /** Takes a token of the key's bucket: 0, or how many ms until there is one. */
  take(key: string, now: number): number {
    let b = this.buckets.get(key);
    if (!b) {
      if (this.buckets.size >= MAX_THROTTLE_KEYS) this.buckets.clear();
      this.buckets.set(key, (b = { tokens: this.burst, at: now }));
    }
    b.tokens = Math.min(this.burst, b.tokens + ((now - b.at) / 1000) * this.perSecond);
    b.at = now;
    if (b.tokens < 1) return Math.ceil(((1 - b.tokens) * 1000) / this.perSecond);
    b.tokens--;
    return 0;
  }

  /** Waits while the key is over its rate (nothing further is read meanwhile: backpressure); `onHold` is called once when it has to wait. */
  async pace(key: string, onHold: () => void) {
    let wait = this.take(key, Date.now());
    if (wait === 0) return;
    onHold();
    while (wait > 0) {
      await new Promise((r) => setTimeout(r, wait));
      wait = this.take(key, Date.now());
    }
  }
}

/** Whether a reason for a key is due to be recorded again. */
export class RecordGate {
  private recorded = new Map<string, number>();

  constructor(private readonly every: number) {}

  due(key: string, now: number, every = this.every): boolean {
    const at = this.recorded.get(key);
    if (at !== undefined && now - at < every) return false;
    if (this.recorded.size >= MAX_THROTTLE_KEYS) this.recorded.clear();
    this.recorded.set(key, now);
    return true;
  }
}
