/** What other features use of the Portfolio: its keys, since every trial's writes change its rows. */
export { portfolioKeys } from './query-keys';
