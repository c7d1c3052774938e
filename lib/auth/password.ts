import bcrypt from "bcryptjs";

// Cost 12 is the common-practice default for interactive logins in 2020s hardware (~250 ms).
const BCRYPT_COST = 12;

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, BCRYPT_COST);
}

export function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}
