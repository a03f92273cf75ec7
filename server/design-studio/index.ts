/**
 * Designs: comparing, signing and amending them, and the design in force for a cohort. Other
 * features import this feature only through this file.
 */
export { chosenDesign } from './candidates.js';
export { currentDesign, currentDesigns } from './design-studio.repository.js';
export type { LockedDesign } from './design-studio.repository.js';
export { designStudioRoutes } from './design-studio.routes.js';
export { signatureMeaning } from './design-studio.schema.js';
export type { Selection } from './design-studio.schema.js';
