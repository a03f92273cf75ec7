/** Statuses and outcomes read as words with an icon beside them, never colour alone. */
import { describe, expect, it } from 'vitest';
import { render } from '@testing-library/react';
import { StatusTag } from '../../client/src/components/ui';
import { OutcomeTag } from '../../client/src/features/patients/words';
import { STATUS_WORDS, type TrialStatus } from '../../server/words';

const parts = (tag: HTMLElement) => {
  const icon = tag.querySelector('[aria-hidden]');
  return { icon: icon?.textContent ?? '', words: tag.textContent?.replace(icon?.textContent ?? '', '').trim() };
};

describe('StatusTag', () => {
  it.each([
    ['draft', 'Draft'],
    ['enrolling_stage_1', 'Enrolling stage 1'],
    ['interim_review', 'Interim review'],
    ['enrolling_stage_2', 'Enrolling stage 2'],
    ['final_analysis', 'Final analysis'],
    ['completed', 'Completed'],
    ['stopped', 'Stopped'],
    ['mixed', 'Cohorts differ'],
  ] as Array<[TrialStatus, string]>)('when the status is %s, then it reads "%s" with its glyph hidden from screen readers', (status, label) => {
    const { container } = render(<StatusTag status={status} />);
    const { icon, words } = parts(container.firstElementChild as HTMLElement);
    expect(words).toBe(label);
    expect(icon.trim()).toBe(STATUS_WORDS[status].glyph);
  });

  it('when two statuses differ, then their icons differ too, so neither colour nor icon stands alone', () => {
    const icons = (['enrolling_stage_1', 'interim_review', 'stopped', 'completed'] as const).map((status) => {
      const { container } = render(<StatusTag status={status} />);
      return parts(container.firstElementChild as HTMLElement).icon;
    });
    expect(new Set(icons).size).toBe(icons.length);
  });
});

describe('OutcomeTag', () => {
  it.each([
    ['pending', 'Pending'],
    ['responder', 'Responder'],
    ['non_responder', 'Non-responder'],
  ] as const)('when the outcome is %s, then it reads "%s" with an icon', (outcome, label) => {
    const { container } = render(<OutcomeTag outcome={outcome} />);
    const { icon, words } = parts(container.firstElementChild as HTMLElement);
    expect(words).toBe(label);
    expect(icon.trim()).not.toBe('');
  });
});
