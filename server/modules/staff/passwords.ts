import { hash, verify } from '@node-rs/argon2';

export const hashPassword = (password: string) => hash(password);

// Verifying against a fixed hash when the account does not exist keeps the answer time the same,
// so a failed sign-in never reveals whether an e-mail is registered.
let dummyHash: Promise<string> | null = null;
export async function verifyPassword(passwordHash: string | null, password: string): Promise<boolean> {
  if (!passwordHash) {
    dummyHash ??= hash('no-such-account-placeholder');
    await verify(await dummyHash, password).catch(() => false);
    return false;
  }
  return verify(passwordHash, password).catch(() => false);
}
