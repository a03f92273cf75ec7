import { Form, Formik } from 'formik';
import { Button } from '../../components/ui';
import { SelectField, TextField } from '../../components/field';
import { auditQuerySchema } from '../../../../server/audit/audit.schema';
import type { AuditFilters } from './get-audit';
import { entityWords } from './entity-words';

const empty = { entityType: '', entityId: '', actor: '', from: '', to: '' };

/** Narrows the trail by what changed, who changed it and when. */
export function AuditFiltersForm({ entityTypes, onApply }: { entityTypes: string[]; onApply: (filters: AuditFilters) => void }) {
  return (
    <Formik
      initialValues={empty}
      validationSchema={auditQuerySchema.pick(['entityType', 'entityId', 'actor', 'from', 'to'])}
      onSubmit={(values) => onApply(Object.fromEntries(Object.entries(values).filter(([, v]) => v !== '')))}
      onReset={() => onApply({})}
    >
      <Form noValidate className="grid items-end gap-3 sm:grid-cols-3 lg:grid-cols-6">
        <SelectField name="entityType" label="What">
          <option value="">Everything</option>
          {entityTypes.map((type) => (
            <option key={type} value={type}>
              {entityWords(type)}
            </option>
          ))}
        </SelectField>
        <TextField name="entityId" label="Record id" autoComplete="off" />
        <TextField name="actor" label="Who (e-mail contains)" autoComplete="off" />
        <TextField name="from" label="From" type="date" />
        <TextField name="to" label="To" type="date" />
        <div className="flex gap-2">
          <Button type="submit">Apply</Button>
          <Button type="reset" variant="secondary">
            Clear
          </Button>
        </div>
      </Form>
    </Formik>
  );
}
