/**
 * Shown with every signature: why the last password entry was refused (the identity service's
 * answer comes back as `?signInError=`), or that the password for this signature has been entered
 * and the signature can now be completed.
 */
import { useSearchParams } from 'react-router-dom';
import { signInErrorText } from '../lib/sign-in-errors';

export function SigningNotice({ ready }: { ready: boolean }) {
  const [params] = useSearchParams();
  const error = signInErrorText(params.get('signInError'));
  if (error) {
    return (
      <p role="alert" className="border-l-4 border-alert-600 bg-alert-50 px-3 py-2 text-sm text-alert-600">
        <span aria-hidden>⚠ </span>
        {error}
      </p>
    );
  }
  if (!ready) return null;
  return (
    <p role="status" className="border-l-4 border-brass-500 bg-brass-50 px-3 py-2 text-sm text-ink-800">
      <span aria-hidden>↺ </span>You entered your password for this signature. Check what you sign below, then sign.
    </p>
  );
}
