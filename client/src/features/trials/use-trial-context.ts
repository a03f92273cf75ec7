import { useOutletContext } from 'react-router-dom';
import type { Trial } from './get-trial';

/** The trial loaded by the trial layout, for every page inside it. */
export const useTrialContext = () => useOutletContext<Trial>();
