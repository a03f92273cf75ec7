/** What the app and other features use of signing in: who is signed in, their roles, and signing out. */
export { allRoles, authKeys, useMe, useSigningReady } from './get-me';
export { useSignOut } from './sign-out';
export { SignInPage } from './sign-in-page';
