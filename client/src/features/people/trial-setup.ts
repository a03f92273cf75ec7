/** What the trial record carries for its set-up forms (the trial query returns these beside the basics). */
import type { Trial } from '../trial-overview/get-trial';
import type { ProtocolSettings, TrialDetail, TrialSite } from '../../../../server/trials/trials.repository';

export type { ProtocolSettings, TrialSite };

export type TrialSetup = Trial & Pick<TrialDetail, 'sites' | 'protocolSettings'>;
