// argon2id through @node-rs/argon2 (a maintained Rust binding; its binary ships in the registry package).
import { hash, verify, type Algorithm } from "@node-rs/argon2";

// Algorithm.Argon2id: the package exports a const enum, which isolatedModules cannot read as a value.
const ARGON2ID = 2 as Algorithm;

// OWASP's password-storage guidance (argon2id, m = 19 MiB, t = 2, p = 1) — from memory.
const OPTIONS = { algorithm: ARGON2ID, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

export function hashPassword(password: string): Promise<string> {
  return hash(password, OPTIONS);
}

export async function verifyPassword(hashed: string, password: string): Promise<boolean> {
  try {
    return await verify(hashed, password);
  } catch {
    return false;
  }
}

/** A real hash of a random string: verified against when the account is unknown, so timing says nothing. */
let dummyHash: Promise<string> | null = null;
export function dummyPasswordHash(): Promise<string> {
  dummyHash ??= hashPassword(`no-such-account-${Math.random()}`);
  return dummyHash;
}
