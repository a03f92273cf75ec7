/** How the visibility rule reads to a person: why figures are absent, and the date released figures stand at. */

/** Who a hidden-figures sentence speaks to. */
export type HiddenAudience = 'sponsor' | 'site' | 'operational';

/** Which figures a hidden-figures sentence is about: response (efficacy) or safety (toxicity). */
export type HiddenFigures = 'response' | 'safety';

/** Why live, trial-wide response or safety figures are absent; `released` when a released cut's figures are shown instead. */
export function liveFiguresHidden(audience: HiddenAudience, released: boolean, figures: HiddenFigures = 'response'): string {
  const instead = released ? ' The figures shown are those of the data cut a committee decision released, frozen at that cut.' : '';
  switch (audience) {
    case 'sponsor':
      return `Live ${figures} figures reach sponsors only where the locked design allows it; otherwise only the figures of a data cut that a committee decision released.${instead || ' No cut of this cohort has been released yet.'}`;
    case 'site':
      return figures === 'response'
        ? `Trial-wide response figures reach site staff only once a committee decision releases a data cut (or where the locked design allows it); your own sites' counts are shown.${instead}`
        : `Trial-wide safety figures reach site staff only once a committee decision releases a data cut (or where the locked design allows it); your own sites' events are on the Safety page.${instead}`;
    case 'operational':
      return `Trial managers see operational figures only (enrolment, pending outcomes, data issues); ${figures} figures stay with the statistician and the committee.`;
  }
}

// One formatter for every label: building one per call costs more than the rest of a request's projection.
const CUT_DATE = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' });

/** "3 March 2026": a cut's calendar date (UTC, as the cut is stored). */
const cutDate = (at: string) => CUT_DATE.format(new Date(at));

/** The label every released figure carries: "as of the data cut of 3 March 2026". */
export const releasedAsOf = (cutAt: string) => `as of the data cut of ${cutDate(cutAt)}`;
