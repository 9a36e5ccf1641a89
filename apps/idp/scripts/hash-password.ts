/** Prints the scrypt hash of a password for an accounts file: tsx scripts/hash-password.ts <password> */
import { hashPassword } from '../src/passwords';

const password = process.argv[2];
if (!password) {
  console.error('usage: tsx scripts/hash-password.ts <password>');
  process.exit(2);
}
console.log(await hashPassword(password));
