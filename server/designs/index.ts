/**
 * Designs: comparing, signing and amending them, and the design in force for a cohort. Other
 * features import this feature only through this file.
 */
export { chosenDesign } from './candidates.js';
export { currentDesign, currentDesigns } from './designs.repository.js';
export type { LockedDesign } from './designs.repository.js';
export { designsRoutes } from './designs.routes.js';
export { signatureMeaning } from './designs.schema.js';
export type { Selection } from './designs.schema.js';
