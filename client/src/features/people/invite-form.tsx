import { Form, Formik } from 'formik';
import { Button, ErrorNotice } from '../../components/ui';
import { TextField } from '../../components/field';
import { membershipInviteSchema } from '../../../../server/people/people.schema';
import { showServerError } from '../../lib/form-errors';
import { RoleSiteFields } from './role-site-fields';
import type { TrialSite } from '../trials';
import { useInviteMember } from './use-invite-member';

/** Invites a person by e-mail; they receive a message naming the trial and the role. */
export function InviteForm({ trialId, sites, onInvited }: { trialId: string; sites: TrialSite[]; onInvited: (message: string) => void }) {
  const invite = useInviteMember(trialId);
  return (
    <Formik
      initialValues={{ email: '', role: '', siteId: '' }}
      validationSchema={membershipInviteSchema}
      onSubmit={async (values, helpers) => {
        helpers.setStatus(undefined);
        try {
          const membership = await invite.mutateAsync(membershipInviteSchema.cast(values, { stripUnknown: true }));
          helpers.resetForm();
          onInvited(
            membership.status === 'active'
              ? `${membership.email} is a member now; an e-mail tells them so.`
              : `${membership.email} is invited; the membership becomes active at their first sign-in.`,
          );
        } catch (error) {
          showServerError(error, helpers);
        }
      }}
    >
      {({ isSubmitting, status }) => (
        <Form noValidate className="grid gap-3">
          <TextField name="email" label="E-mail" type="email" autoComplete="off" />
          <RoleSiteFields sites={sites} />
          {status && <ErrorNotice error={status} title="Nobody was invited" />}
          <div>
            <Button type="submit" disabled={isSubmitting}>
              {isSubmitting ? 'Inviting…' : 'Invite'}
            </Button>
          </div>
        </Form>
      )}
    </Formik>
  );
}
