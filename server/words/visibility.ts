/** How the visibility rule reads to a person: why figures are absent, and the date released figures stand at. */

/** Who a hidden-figures sentence speaks to. */
export type HiddenAudience = 'sponsor' | 'site' | 'operational';

/** Why live, trial-wide response figures are absent; `released` when a released cut's figures are shown instead. */
export function liveFiguresHidden(audience: HiddenAudience, released: boolean): string {
  const instead = released ? ' The figures shown are those of the data cut a committee decision released, frozen at that cut.' : '';
  switch (audience) {
    case 'sponsor':
      return `Live response figures reach sponsors only where the locked design allows it; otherwise only the figures of a data cut that a committee decision released.${instead || ' No cut of this cohort has been released yet.'}`;
    case 'site':
      return `Trial-wide response figures reach site staff only once a committee decision releases a data cut (or where the locked design allows it); your own sites' counts are shown.${instead}`;
    case 'operational':
      return 'Trial managers see operational figures only (enrolment, pending outcomes, data issues); response figures stay with the statistician and the committee.';
  }
}

/** "3 March 2026": a cut's calendar date (UTC, as the cut is stored). */
const cutDate = (at: string) => new Date(at).toLocaleDateString('en-GB', { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' });

/** The label every released figure carries: "as of the data cut of 3 March 2026". */
export const releasedAsOf = (cutAt: string) => `as of the data cut of ${cutDate(cutAt)}`;
