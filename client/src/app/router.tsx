import { createBrowserRouter } from 'react-router-dom';
import { Shell } from './shell';
import { NotFoundPage } from './not-found';
import { RouteErrorPage } from './error-boundary';
import { globalRoutes, trialRoutes } from './features';
import { TrialLayout } from '../features/trial-overview/trial-layout';

export const router = createBrowserRouter([
  {
    path: '/',
    element: <Shell />,
    errorElement: <RouteErrorPage />,
    children: [
      ...globalRoutes,
      { path: 'trials/:trialId', element: <TrialLayout />, children: trialRoutes },
      { path: '*', element: <NotFoundPage /> },
    ],
  },
]);
