/** The local identity provider's accounts: one demo person per role (the README lists them), plus a few spare people. All invented. */
export type Account = { sub: string; email: string; name: string; password: string; emailVerified: boolean };

export const DEMO_PASSWORD = 'demo';

const person = (sub: string, email: string, name: string, emailVerified = true): Account => ({ sub, email, name, password: DEMO_PASSWORD, emailVerified });

export const accounts: Account[] = [
  person('u-ada', 'ada.admin@tessaly.test', 'Ada Admin'),
  person('u-sam', 'sam.stat@tessaly.test', 'Sam Stat'),
  person('u-cora', 'cora.coord@tessaly.test', 'Cora Coord'),
  person('u-ivan', 'ivan.inv@tessaly.test', 'Ivan Inv'),
  person('u-mona', 'mona.monitor@tessaly.test', 'Mona Monitor'),
  person('u-spencer', 'spencer.sponsor@tessaly.test', 'Spencer Sponsor'),
  // Spare people for invitations and for tests that need a second member in a role.
  person('u-nina', 'nina.newcomer@tessaly.test', 'Nina Newcomer'),
  person('u-hal', 'hal.coord@tessaly.test', 'Hal Coord'),
  person('u-mika', 'mika.monitor@tessaly.test', 'Mika Monitor'),
  person('u-lena', 'lena.stat@tessaly.test', 'Lena Stat'),
  // An account whose e-mail address the provider has not verified: Orrery refuses to sign it in.
  person('u-uma', 'uma.unverified@tessaly.test', 'Uma Unverified', false),
];

export function findAccountByEmail(email: string): Account | undefined {
  return accounts.find((a) => a.email === email.trim().toLowerCase());
}

export function findAccountBySub(sub: string): Account | undefined {
  return accounts.find((a) => a.sub === sub);
}
