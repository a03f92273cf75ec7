import { lazyPage, type Feature } from '../../lib/feature';

export const patientsFeature: Feature = {
  trialRoutes: [
    { path: 'patients', ...lazyPage(() => import('./patients-page').then((m) => m.PatientsPage)) },
    { path: 'patients/import', ...lazyPage(() => import('./import-page').then((m) => m.ImportPage)) },
    { path: 'patients/:patientId', ...lazyPage(() => import('./patient-page').then((m) => m.PatientPage)) },
  ],
  trialNav: [{ path: 'patients', label: 'Patients', roles: ['coordinator', 'investigator', 'statistician', 'monitor'], order: 30 }],
};
