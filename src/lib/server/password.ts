// Password hashing with Argon2id (OWASP Password Storage Cheat Sheet parameters: m = 19 MiB, t = 2, p = 1).
import { hash, verify } from '@node-rs/argon2';

const options = { memoryCost: 19456, timeCost: 2, outputLen: 32, parallelism: 1, algorithm: 2 /* Argon2id */ } as const;

export function hashPassword(password: string): Promise<string> {
  return hash(password, options);
}

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}
