/** What other features use of People & sites: a trial's members panel, and the list of sites a trial picks from. */
export { MembersPanel } from './members-panel';
export { useSites } from './get-sites';
