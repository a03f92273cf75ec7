import type { RouteSpec } from '../http/routes.js';

export const dataCutsRoutes: RouteSpec[] = [];
