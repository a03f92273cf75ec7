/** Where a patient's adverse events live on the server. */
export const eventsPath = (trialId: string, patientId: string) => `/api/trials/${trialId}/patients/${patientId}/adverse-events`;
