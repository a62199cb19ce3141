import bcrypt from 'bcryptjs';

export function hashPassword(password: string, cost: number): Promise<string> {
  return bcrypt.hash(password, cost);
}

export function checkPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}

// A valid hash of a random string: comparing against it when the e-mail is unknown makes
// a failed sign-in take as long as a wrong password (no account enumeration by timing).
let dummy: Promise<string> | undefined;
export function dummyHash(cost: number): Promise<string> {
  dummy ??= bcrypt.hash(`no-such-user-${Math.random()}`, cost);
  return dummy;
}
