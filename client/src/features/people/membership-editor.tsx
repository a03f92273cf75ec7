import { Form, Formik } from 'formik';
import { Button, ErrorNotice } from '../../components/ui';
import { membershipUpdateSchema } from '../../../../server/people/people.schema';
import { showServerError } from '../../lib/form-errors';
import type { Membership } from './get-memberships';
import { RoleSiteFields } from './role-site-fields';
import type { TrialSite } from '../trials';
import { useUpdateMembership } from './use-update-membership';

/** Changes a member's role or site; a concurrent change by someone else is reported, not overwritten. */
export function MembershipEditor({ membership, sites, onDone }: { membership: Membership; sites: TrialSite[]; onDone: (message?: string) => void }) {
  const update = useUpdateMembership(membership.trialId);
  return (
    <Formik
      key={`${membership.id}-${membership.version}`}
      initialValues={{ role: membership.role, siteId: membership.siteId ?? '', version: membership.version }}
      validationSchema={membershipUpdateSchema}
      onSubmit={async (values, helpers) => {
        helpers.setStatus(undefined);
        try {
          const saved = await update.mutateAsync({ membershipId: membership.id, ...membershipUpdateSchema.cast(values, { stripUnknown: true }) });
          onDone(`${saved.email}'s role is saved.`);
        } catch (error) {
          showServerError(error, helpers);
        }
      }}
    >
      {({ isSubmitting, status }) => (
        <Form noValidate className="grid gap-3">
          <p className="text-sm">
            Changing <strong>{membership.name ?? membership.email}</strong>
          </p>
          <RoleSiteFields sites={sites} />
          {status && <ErrorNotice error={status} title="The change was not saved" />}
          <div className="flex gap-2">
            <Button type="submit" disabled={isSubmitting}>
              {isSubmitting ? 'Saving…' : 'Save'}
            </Button>
            <Button variant="secondary" onClick={() => onDone()}>
              Cancel
            </Button>
          </div>
        </Form>
      )}
    </Formik>
  );
}
