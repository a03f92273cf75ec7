import { createBrowserRouter } from 'react-router-dom';
import { Shell } from './shell';
import { NotFoundPage } from './not-found';
import { RouteErrorPage } from './error-boundary';
import { globalRoutes, trialRoutes } from './features';
import { TrialLayout } from './trial-layout';
import { Loading } from '../components/ui';

export const router = createBrowserRouter([
  {
    path: '/',
    element: <Shell />,
    errorElement: <RouteErrorPage />,
    // Shown while a page's code loads on the first visit (pages load on demand).
    hydrateFallbackElement: <Loading />,
    children: [
      ...globalRoutes,
      { path: 'trials/:trialId', element: <TrialLayout />, children: trialRoutes },
      { path: '*', element: <NotFoundPage /> },
    ],
  },
]);
