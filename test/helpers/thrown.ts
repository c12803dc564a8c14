import { expect } from "vitest";

type ErrorClass<E extends Error> = abstract new (...args: never[]) => E;

/** The error `run` throws, which must be a `kind` (the test fails if `run` returns instead). */
export function thrownBy<E extends Error>(kind: ErrorClass<E>, run: () => unknown): E {
  try {
    run();
  } catch (err) {
    expect(err).toBeInstanceOf(kind);
    return err as E;
  }
  throw new Error(`expected a ${kind.name}, but nothing was thrown`);
}

/** The error the promise of `run` rejects with, which must be a `kind`. */
export async function rejectedWith<E extends Error>(kind: ErrorClass<E>, run: () => Promise<unknown>): Promise<E> {
  try {
    await run();
  } catch (err) {
    expect(err).toBeInstanceOf(kind);
    return err as E;
  }
  throw new Error(`expected a ${kind.name}, but the promise resolved`);
}
