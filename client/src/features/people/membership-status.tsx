/** A membership's status as a word with an icon, never colour alone. */
import { GLYPHS } from '../../../../server/words';

export function MembershipStatus({ status }: { status: 'pending' | 'active' }) {
  return status === 'active' ? (
    <span className="inline-flex items-center gap-1 text-xs font-semibold text-good-700">
      <span aria-hidden>{GLYPHS.done} </span>Active
    </span>
  ) : (
    <span className="inline-flex items-center gap-1 text-xs font-semibold text-brass-700" title="Becomes active at the person's first sign-in">
      <span aria-hidden>{GLYPHS.pending} </span>Pending first sign-in
    </span>
  );
}
