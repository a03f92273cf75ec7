/**
 * How a feature plugs into the app: its pages (global ones under the shell, trial ones under
 * /trials/:trialId) and its navigation entries with the roles that see them. Each feature folder
 * exports one `Feature` from its `routes.tsx`; `app/features.ts` lists them.
 */
import type { ComponentType } from 'react';
import type { RouteObject } from 'react-router-dom';
import type { Role } from './roles';

export type NavItem = {
  /** Relative to the app root for global items, to /trials/:trialId for trial items. */
  path: string;
  label: string;
  /** Who sees the entry; absent means every signed-in member. */
  roles?: readonly Role[];
  order: number;
  devOnly?: boolean;
};

export type Feature = {
  routes?: RouteObject[];
  trialRoutes?: RouteObject[];
  nav?: NavItem[];
  trialNav?: NavItem[];
};

/** A page loaded on first visit, so each feature's code stays out of the initial bundle. */
export const lazyPage = (load: () => Promise<ComponentType>): Pick<RouteObject, 'lazy'> => ({
  lazy: async () => ({ Component: await load() }),
});
