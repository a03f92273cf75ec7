import type { Feature } from '../../app/feature';
import { PatientsPage } from './patients-page';
import { PatientPage } from './patient-page';
import { ImportPage } from './import-page';

export const patientsFeature: Feature = {
  trialRoutes: [
    { path: 'patients', element: <PatientsPage /> },
    { path: 'patients/import', element: <ImportPage /> },
    { path: 'patients/:patientId', element: <PatientPage /> },
  ],
  trialNav: [{ path: 'patients', label: 'Patients', roles: ['coordinator', 'investigator', 'statistician', 'monitor'], order: 30 }],
};
