/**
 * Designs: comparing, signing and amending them, and the design in force for a cohort. Other
 * features import this feature only through this file.
 */
export { chosenDesign } from './candidates.js';
export { runBryantDayGrid, runSafetyDesigns } from './candidates-pool.js';
export { boundaryWithCurve, type BoundaryWithCurve, type BryantDayGrid } from './safety-candidates.js';
export { currentDesign, currentDesigns } from './designs.repository.js';
export type { LockedDesign, ToxicityDefinition } from './designs.repository.js';
export { designsRoutes } from './designs.routes.js';
export { signatureMeaning } from './designs.schema.js';
export type { Selection } from './designs.schema.js';
