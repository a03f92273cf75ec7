/**
 * Prepared statements are compiled by Knex once, with markers for their arguments; every later
 * call must bind its own arguments in the places the markers landed, beside the builder's constants.
 */
import { describe, expect, it } from 'vitest';
import knexFactory from 'knex';
import { preparedStatement } from '../../server/db/knex.js';

const db = knexFactory({ client: 'pg' });

describe('preparedStatement', () => {
  it('when called again with other arguments, then each lands in its own place and the constants stay', () => {
    let builds = 0;
    const statement = preparedStatement('test_memberships', (knex, trialId: string, userId: string) => {
      builds += 1;
      return knex('memberships').where({ trial_id: trialId, status: 'active', user_id: userId }).select('role');
    });
    const first = statement(db, 'trial-1', 'user-1');
    const second = statement(db, 'trial-2', 'user-2');
    expect(builds).toBe(1);
    expect(first.text).toBe(second.text);
    expect(first.text).toBe('select "role" from "memberships" where "trial_id" = $1 and "status" = $2 and "user_id" = $3');
    expect(first.values).toEqual(['trial-1', 'active', 'user-1']);
    expect(second.values).toEqual(['trial-2', 'active', 'user-2']);
    expect(second.name).toBe('test_memberships');
  });

  it('when an argument is used twice, then both places get it', () => {
    const statement = preparedStatement('test_twice', (knex, id: string) => knex.raw('select ? as a, ? as b', [id, id]));
    expect(statement(db, 'x').values).toEqual(['x', 'x']);
  });

  it('when the builder changes an argument instead of passing it through, then the first call says so', () => {
    const statement = preparedStatement('test_changed', (knex, code: string) => knex('trials').where({ code: code.toUpperCase() }));
    expect(() => statement(db, 'abc')).toThrow(/argument 0 does not reach the statement/);
  });
});
