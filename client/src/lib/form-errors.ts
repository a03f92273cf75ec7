/** Puts the server's field messages (400/409) under the matching form fields and keeps the whole error for the form's notice. */
import { setIn, type FormikHelpers } from 'formik';
import { ApiError } from './api';

export function showServerError<T>(error: unknown, helpers: FormikHelpers<T>): void {
  if (error instanceof ApiError) {
    const entries = Object.entries(error.fields);
    if (entries.length > 0) {
      helpers.setErrors(entries.reduce((errors, [field, message]) => setIn(errors, field, message), {}));
      void helpers.setTouched(entries.reduce((touched, [field]) => setIn(touched, field, true), {}), false);
    }
  }
  helpers.setStatus(error);
}
