/**
 * A bounded queue between a producer (the validator) and a consumer (COPY reading it as an async
 * iterable). `push` returns a promise while the queue is full, so memory stays bounded; `fail` wakes a
 * waiting producer with the consumer's error, so a failed COPY cannot leave the validator hanging.
 */
export class Channel<T> implements AsyncIterable<T> {
  private readonly items: T[] = [];
  private closed = false;
  private error: unknown = null;
  private wakeConsumer: (() => void) | null = null;
  private wakeProducer: (() => void) | null = null;

  constructor(private readonly highWater = 8) {}

  /** Queues an item; returns a promise to await when the queue is full (undefined otherwise). */
  push(item: T): Promise<void> | undefined {
    if (this.error) throw this.error;
    if (this.closed) throw new Error('Channel.push: closed');
    this.items.push(item);
    this.wakeConsumer?.();
    if (this.items.length < this.highWater) return undefined;
    return new Promise<void>((resolve, reject) => {
      this.wakeProducer = () => {
        this.wakeProducer = null;
        if (this.error) reject(this.error);
        else resolve();
      };
    });
  }

  close(): void {
    this.closed = true;
    this.wakeConsumer?.();
  }

  fail(err: unknown): void {
    this.error = err ?? new Error('Channel failed');
    this.wakeProducer?.();
    this.wakeConsumer?.();
  }

  async *[Symbol.asyncIterator](): AsyncIterator<T> {
    for (;;) {
      if (this.error) throw this.error;
      const item = this.items.shift();
      if (item !== undefined) {
        if (this.items.length < this.highWater / 2) this.wakeProducer?.();
        yield item;
        continue;
      }
      if (this.closed) return;
      await new Promise<void>((resolve) => (this.wakeConsumer = resolve));
      this.wakeConsumer = null;
    }
  }
}
