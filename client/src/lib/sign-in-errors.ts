/** What each sign-in refusal (`?signInError=` from the server's callback) means, in words. */
export const SIGN_IN_ERRORS: Record<string, string> = {
  expired: 'Your sign-in took too long or was started in another tab. Please sign in again.',
  failed: 'The identity service did not confirm your sign-in. Please try again.',
  'different-user': 'You confirmed your identity as a different person. Signatures must come from the person signed in.',
  'unverified-email': 'The identity service has not verified your e-mail address, so Orrery cannot tell which invitations are yours. Ask your organisation to verify it.',
  'no-email': 'The identity service did not say which e-mail address is yours. Ask your organisation to release it to Orrery.',
  'no-auth-time': 'The identity service did not say when you entered your password, so it cannot stand behind a signature. Nothing was signed.',
  'not-fresh': 'The identity service reported an earlier password entry, not one made for this signature. Nothing was signed; try again.',
};

export const signInErrorText = (code: string | null): string | undefined => (code ? (SIGN_IN_ERRORS[code] ?? 'Sign-in did not complete.') : undefined);
