import bcrypt from "bcryptjs";

/** bcrypt with cost 12: slow and salted; the hash carries its own salt and cost. */
const COST = 12;

export const PASSWORD_MIN_LENGTH = 12;

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, COST);
}

export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}

let decoyHash: Promise<string> | undefined;

/**
 * Spends the same time as a real check when the e-mail is unknown, so that the response time
 * does not reveal which accounts exist.
 */
export async function verifyAgainstDecoy(password: string): Promise<false> {
  decoyHash ??= bcrypt.hash("bellwether-decoy", COST);
  await bcrypt.compare(password, await decoyHash);
  return false;
}
