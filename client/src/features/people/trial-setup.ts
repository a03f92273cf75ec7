/** What the trial record carries for its set-up forms (the trial query returns these beside the basics). */
import type { Trial } from '../trial-overview/get-trial';

export type TrialSite = { id: string; code: string; name: string; country: string; plannedAccrualPerMonth: number | null };

export type ProtocolSettings = {
  outcomeSource: 'entered' | 'derived';
  confirmationRequired: boolean;
  confirmationMinDays: number;
  sdMinDays: number;
  neBetweenResponses: 'ignore' | 'breaks_confirmation';
  assessmentIntervalDays: number;
  inactivityWarningWeeks: number;
};

export type TrialSetup = Trial & { sites: TrialSite[]; protocolSettings: ProtocolSettings };
