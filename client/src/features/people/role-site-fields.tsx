import { useFormikContext } from 'formik';
import { SelectField } from '../../components/field';
import { ROLES, ROLE_LABELS } from '../../lib/roles';
import { SITE_MEMBER_ROLES } from '../../../../server/people/people.schema';
import type { TrialSite } from '../trials';

/** Role, and the site for the roles that work at one; choosing another role clears the site. */
export function RoleSiteFields({ sites }: { sites: TrialSite[] }) {
  const { values, setFieldValue } = useFormikContext<{ role: string; siteId: string }>();
  const needsSite = SITE_MEMBER_ROLES.includes(values.role);
  return (
    <>
      <SelectField
        name="role"
        label="Role"
        onChange={(event) => {
          void setFieldValue('role', event.target.value);
          if (!SITE_MEMBER_ROLES.includes(event.target.value)) void setFieldValue('siteId', '');
        }}
      >
        <option value="">Choose a role…</option>
        {ROLES.map((role) => (
          <option key={role} value={role}>
            {ROLE_LABELS[role]}
          </option>
        ))}
      </SelectField>
      {needsSite && (
        <SelectField name="siteId" label="Site" hint="Coordinators and investigators see patients of their own site only.">
          <option value="">Choose one of the trial's sites…</option>
          {sites.map((site) => (
            <option key={site.id} value={site.id}>
              {site.code} — {site.name}
            </option>
          ))}
        </SelectField>
      )}
    </>
  );
}
