// Device stream tokens. A token is shown once (to the biomedical engineer who configures the device); Corvane keeps
// its SHA-256 to recognise it and an AES-256-GCM ciphertext so the ingest can present it to the device. The key is
// derived from NEXTAUTH_SECRET (HKDF, its own label), so no second secret has to be managed.
import { createCipheriv, createDecipheriv, createHash, hkdfSync, randomBytes, timingSafeEqual } from "node:crypto";

function key(secret = process.env.NEXTAUTH_SECRET): Buffer {
  if (!secret) throw new Error("NEXTAUTH_SECRET is not set: device stream tokens cannot be encrypted");
  return Buffer.from(hkdfSync("sha256", secret, "corvane", "device stream tokens v1", 32));
}

/** A new random token: 32 bytes, base64url (43 characters). */
export function generateStreamToken(): string {
  return randomBytes(32).toString("base64url");
}

export function hashStreamToken(token: string): string {
  return createHash("sha256").update(token).digest("hex");
}

/** Constant-time check of a presented token against a stored hash. */
export function tokenMatches(presented: string, storedHash: string): boolean {
  const a = Buffer.from(hashStreamToken(presented), "hex");
  const b = Buffer.from(storedHash, "hex");
  return a.length === b.length && timingSafeEqual(a, b);
}

/** "v1.<iv>.<tag>.<ciphertext>", base64url parts. */
export function encryptStreamToken(token: string, secret?: string): string {
  const iv = randomBytes(12);
  const cipher = createCipheriv("aes-256-gcm", key(secret), iv);
  const ct = Buffer.concat([cipher.update(token, "utf8"), cipher.final()]);
  return ["v1", iv.toString("base64url"), cipher.getAuthTag().toString("base64url"), ct.toString("base64url")].join(".");
}

export function decryptStreamToken(sealed: string, secret?: string): string {
  const [v, iv, tag, ct] = sealed.split(".");
  if (v !== "v1" || !iv || !tag || !ct) throw new Error("not a sealed stream token");
  const decipher = createDecipheriv("aes-256-gcm", key(secret), Buffer.from(iv, "base64url"));
  decipher.setAuthTag(Buffer.from(tag, "base64url"));
  return Buffer.concat([decipher.update(Buffer.from(ct, "base64url")), decipher.final()]).toString("utf8");
}
