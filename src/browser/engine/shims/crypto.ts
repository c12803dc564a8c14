import { Buffer } from "buffer";
import { hmac } from "@noble/hashes/hmac.js";
import { sha256 } from "@noble/hashes/sha2.js";

/**
 * `node:crypto` for the browser bundle: synchronous SHA-256 (FIPS 180-4) and
 * HMAC-SHA-256 (RFC 2104) through @noble/hashes, in the shape the audit's code
 * calls them (createHash("sha256").update(…).digest("hex") or a Buffer).
 * The Web Crypto API is asynchronous only, and the seeding of every random
 * stream (src/stats/rng.ts) and the fingerprint are synchronous.
 */

type Data = string | Uint8Array;

interface Updatable {
  update(data: Uint8Array): void;
  digest(): Uint8Array;
}

const encoder = new TextEncoder();

class Digest {
  private readonly state: Updatable;
  constructor(state: Updatable) {
    this.state = state;
  }
  update(data: Data): this {
    this.state.update(typeof data === "string" ? encoder.encode(data) : data);
    return this;
  }
  digest(): Buffer;
  digest(encoding: "hex" | "base64"): string;
  digest(encoding?: "hex" | "base64"): Buffer | string {
    const bytes = Buffer.from(this.state.digest());
    return encoding === undefined ? bytes : bytes.toString(encoding);
  }
}

function refuseAlgorithm(algorithm: string): never {
  throw new Error(`this build computes sha256 only, not ${algorithm}`);
}

export function createHash(algorithm: string): Digest {
  if (algorithm !== "sha256") refuseAlgorithm(algorithm);
  return new Digest(sha256.create());
}

export function createHmac(algorithm: string, key: Data): Digest {
  if (algorithm !== "sha256") refuseAlgorithm(algorithm);
  return new Digest(hmac.create(sha256, typeof key === "string" ? encoder.encode(key) : key));
}

export function randomBytes(n: number): Buffer {
  const out = Buffer.alloc(n);
  crypto.getRandomValues(out);
  return out;
}

export type Hash = Digest;

export default { createHash, createHmac, randomBytes };
