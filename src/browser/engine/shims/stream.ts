import { EventEmitter } from "events";

/**
 * `node:stream` for the browser bundle: the part of Node's streams the audit's
 * code path uses, nothing more. csv-parse's Parser (a Transform) fed by
 * `Readable.from(blocks).pipe(parser)` and read with `for await`
 * (src/ingest/sources/text/generalRows.ts), and the gzip inflater of the zlib
 * shim driven by write/drain/end and read with `for await`
 * (src/ingest/sources/fileBytes.ts). memfs only subclasses Readable and
 * Writable for streams the audit never opens.
 *
 * Semantics kept from Node: chunks come out in the order pushed; a producer
 * waits while the reader is `highWaterMark` chunks behind (so memory stays
 * bounded); an error passed to a callback or to destroy() is thrown by the
 * reader's `for await`; push(null) ends the reading after what was queued.
 */

type Callback = (err?: Error | null, data?: unknown) => void;

interface StreamOptions {
  highWaterMark?: number;
  objectMode?: boolean;
  readableObjectMode?: boolean;
}

export class Readable extends EventEmitter {
  destroyed = false;
  readable = true;
  readonly readableHighWaterMark: number;
  private queue: unknown[] = [];
  private head = 0;
  private ended = false;
  private endEmitted = false;
  private failure: Error | null = null;
  private wakeReader: (() => void) | null = null;
  private roomWaiters: (() => void)[] = [];

  constructor(options: StreamOptions = {}) {
    super();
    this.readableHighWaterMark = options.highWaterMark ?? 16;
  }

  /** Chunks queued and not yet read. */
  get readableLength(): number {
    return this.queue.length - this.head;
  }

  push(chunk: unknown): boolean {
    if (this.destroyed || this.ended) return false;
    if (chunk === null) this.ended = true;
    else this.queue.push(chunk);
    this.wake();
    return this.readableLength < this.readableHighWaterMark;
  }

  destroy(err?: Error | null): this {
    if (this.destroyed) return this;
    this.destroyed = true;
    this.readable = false;
    if (err) {
      this.failure = err;
      // Node would raise an unhandled 'error'; here a reader's `for await` throws it, listeners hear it.
      if (this.listenerCount("error") > 0) this.emit("error", err);
    }
    this.wake();
    this.releaseRoom();
    this.emit("close");
    return this;
  }

  /** Resolves when the reader has room (fewer than highWaterMark chunks queued) or the stream is gone. */
  protected roomToPush(): Promise<void> {
    if (this.destroyed || this.readableLength < this.readableHighWaterMark) return Promise.resolve();
    return new Promise((resolve) => this.roomWaiters.push(resolve));
  }

  private releaseRoom(): void {
    const waiters = this.roomWaiters;
    this.roomWaiters = [];
    for (const w of waiters) w();
  }

  private wake(): void {
    const w = this.wakeReader;
    this.wakeReader = null;
    w?.();
  }

  private take(): unknown {
    const chunk = this.queue[this.head++];
    if (this.head > 1024 && this.head * 2 > this.queue.length) {
      this.queue = this.queue.slice(this.head);
      this.head = 0;
    }
    if (this.readableLength < this.readableHighWaterMark) this.releaseRoom();
    return chunk;
  }

  async *[Symbol.asyncIterator](): AsyncGenerator<unknown> {
    try {
      for (;;) {
        if (this.failure) throw this.failure;
        if (this.readableLength > 0) {
          yield this.take();
          continue;
        }
        if (this.ended || this.destroyed) {
          if (!this.endEmitted && this.ended) {
            this.endEmitted = true;
            this.emit("end");
          }
          return;
        }
        await new Promise<void>((resolve) => (this.wakeReader = resolve));
      }
    } finally {
      this.destroy();
    }
  }

  /** Write every chunk into `dest` (waiting on its 'drain'), then end it; an error of this stream is its listeners'. */
  pipe<T extends Writable | Transform>(dest: T): T {
    void (async () => {
      try {
        for await (const chunk of this) {
          if (dest.destroyed) return;
          if (!dest.write(chunk)) await new Promise((resolve) => dest.once("drain", resolve));
        }
        if (!dest.destroyed) dest.end();
      } catch (err) {
        if (this.listenerCount("error") > 0 && !this.destroyed) this.emit("error", err);
        else dest.destroy(err as Error);
      }
    })();
    return dest;
  }

  /** A readable stream of an iterable's items (Node's Readable.from). */
  static from(iterable: Iterable<unknown> | AsyncIterable<unknown>): Readable {
    return new IterableReadable(iterable);
  }
}

class IterableReadable extends Readable {
  private readonly iterable: Iterable<unknown> | AsyncIterable<unknown>;
  private iterator: AsyncIterator<unknown> | Iterator<unknown> | null = null;

  constructor(iterable: Iterable<unknown> | AsyncIterable<unknown>) {
    super({ objectMode: true });
    this.iterable = iterable;
  }

  override async *[Symbol.asyncIterator](): AsyncGenerator<unknown> {
    const source = this.iterable;
    const iterator: AsyncIterator<unknown> | Iterator<unknown> =
      Symbol.asyncIterator in source ? (source as AsyncIterable<unknown>)[Symbol.asyncIterator]() : (source as Iterable<unknown>)[Symbol.iterator]();
    this.iterator = iterator;
    try {
      for (;;) {
        if (this.destroyed) return;
        const step = await iterator.next();
        if (step.done) return;
        yield step.value;
      }
    } finally {
      this.destroy();
    }
  }

  override destroy(err?: Error | null): this {
    if (!this.destroyed) void this.iterator?.return?.();
    return super.destroy(err);
  }
}

/** Base of a writable stream; memfs subclasses it for write streams the audit never opens. */
export class Writable extends EventEmitter {
  destroyed = false;
  writable = true;
  constructor(_options: StreamOptions = {}) {
    super();
  }
  write(_chunk: unknown, _encoding?: unknown, _cb?: Callback): boolean {
    throw new Error("this build has no writable streams");
  }
  end(): this {
    throw new Error("this build has no writable streams");
  }
  destroy(_err?: Error | null): this {
    this.destroyed = true;
    return this;
  }
}

/**
 * A stream that turns written chunks into read ones through `_transform`
 * (and `_flush` at the end). Each chunk is transformed once the reader has
 * room, one at a time in order; write() returns false while chunks wait, and
 * 'drain' follows when none does.
 */
export class Transform extends Readable {
  writable = true;
  private chain: Promise<void> = Promise.resolve();
  private waiting = 0;
  private ending = false;
  private readonly writableHighWaterMark: number;

  constructor(options: StreamOptions = {}) {
    super(options);
    this.writableHighWaterMark = options.highWaterMark ?? 16;
  }

  _transform(chunk: unknown, _encoding: string, callback: Callback): void {
    callback(null, chunk);
  }

  _flush(callback: Callback): void {
    callback(null);
  }

  /** Run one of the subclass's callback-style steps; a step that never calls back (after a failure) leaves the chain waiting, as Node does. */
  private step(run: (cb: Callback) => void): Promise<void> {
    return new Promise((resolve, reject) =>
      run((err, data) => {
        if (err) reject(err);
        else {
          if (data !== undefined && data !== null) this.push(data);
          resolve();
        }
      }),
    );
  }

  write(chunk: unknown, encoding?: unknown, cb?: Callback): boolean {
    const done = typeof encoding === "function" ? (encoding as Callback) : cb;
    if (this.destroyed || this.ending) {
      done?.(new Error("write after end"));
      return false;
    }
    this.waiting++;
    this.chain = this.chain.then(async () => {
      try {
        await this.roomToPush();
        if (!this.destroyed) await this.step((c) => this._transform(chunk, "buffer", c));
        done?.(null);
      } catch (err) {
        this.destroy(err as Error);
        done?.(err as Error);
      } finally {
        this.waiting--;
        if (this.waiting === 0) this.emit("drain");
      }
    });
    return this.waiting < this.writableHighWaterMark;
  }

  end(cb?: () => void): this {
    if (this.ending) return this;
    this.ending = true;
    this.chain = this.chain.then(async () => {
      try {
        if (!this.destroyed) await this.step((c) => this._flush(c));
        this.push(null);
        this.emit("finish");
        cb?.();
      } catch (err) {
        this.destroy(err as Error);
      }
    });
    return this;
  }

  override destroy(err?: Error | null): this {
    const was = this.destroyed;
    super.destroy(err);
    if (!was) this.emit("drain"); // a writer waiting for room stops waiting
    return this;
  }
}

export class PassThrough extends Transform {}
export class Duplex extends Transform {}

export default { Readable, Writable, Transform, PassThrough, Duplex };
