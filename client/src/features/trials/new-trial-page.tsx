import { useNavigate } from 'react-router-dom';
import { PageHeader, Panel } from '../../components/ui';
import { trialCreateSchema } from '../../../../server/trials/trials.schema';
import { showServerError } from '../../lib/form-errors';
import { TrialForm } from './trial-form';
import { useCreateTrial } from './use-create-trial';

/** A trial manager sets up a new trial; they become its admin and continue on its People & sites page. */
export function NewTrialPage() {
  const create = useCreateTrial();
  const navigate = useNavigate();
  return (
    <div>
      <PageHeader title="New trial" subtitle="The trial starts as a draft. The statistician then compares and locks its design on the Designs page." />
      <Panel>
        <TrialForm
          submitLabel="Create trial"
          onSubmit={async (values, helpers) => {
            helpers.setStatus(undefined);
            try {
              const trial = await create.mutateAsync(trialCreateSchema.cast(values, { stripUnknown: true }));
              void navigate(`/trials/${trial.id}/people`);
            } catch (error) {
              showServerError(error, helpers);
            }
          }}
        />
      </Panel>
    </div>
  );
}
