import { Form, Formik } from 'formik';
import { Button, ErrorNotice } from '../../components/ui';
import { TextField } from '../../components/field';
import { siteSchema, siteUpdateSchema } from '../../../../server/people/people.schema';
import { showServerError } from '../../lib/form-errors';
import type { Site } from './get-sites';
import { useCreateSite } from './use-create-site';
import { useUpdateSite } from './use-update-site';

/** Creates a site, or edits one when `site` is given; the code is the prefix of study IDs there. */
export function SiteForm({ site, onDone }: { site?: Site; onDone: (site: Site) => void }) {
  const create = useCreateSite();
  const update = useUpdateSite();
  const schema = site ? siteUpdateSchema : siteSchema;
  const initialValues = { code: site?.code ?? '', name: site?.name ?? '', country: site?.country ?? '', version: site?.version ?? 1 };
  return (
    <Formik
      key={site ? `${site.id}-${site.version}` : 'new'}
      initialValues={initialValues}
      validationSchema={schema}
      onSubmit={async (values, helpers) => {
        helpers.setStatus(undefined);
        try {
          const input = siteUpdateSchema.cast(values, { stripUnknown: true });
          const saved = site ? await update.mutateAsync({ siteId: site.id, ...input }) : await create.mutateAsync(input);
          helpers.resetForm();
          onDone(saved);
        } catch (error) {
          showServerError(error, helpers);
        }
      }}
    >
      {({ isSubmitting, status }) => (
        <Form noValidate className="grid gap-3">
          <TextField
            name="code"
            label="Code"
            hint="2 to 8 capital letters or digits. Every study ID at the site begins with it."
            autoComplete="off"
            maxLength={8}
          />
          <TextField name="name" label="Name" autoComplete="off" />
          <TextField name="country" label="Country" autoComplete="country-name" />
          {status && <ErrorNotice error={status} title="The site was not saved" />}
          <div>
            <Button type="submit" disabled={isSubmitting}>
              {isSubmitting ? 'Saving…' : site ? 'Save site' : 'Add site'}
            </Button>
          </div>
        </Form>
      )}
    </Formik>
  );
}
