/** parseQuery keeps the queries it accepted, per schema: the same parameters answer the same frozen value; refusals are never kept. */
import { describe, expect, it } from 'vitest';
import { number, object, string } from 'yup';
import { parseQuery } from '../../server/http/validate.js';
import { InputError } from '../../server/http/errors.js';

const schema = object({ page: number().integer().min(1).default(1), sort: string().oneOf(['a', 'b']).default('a') });

describe('parsing a query string', () => {
  it('when the same parameters come again, then they answer the same frozen value', async () => {
    const first = await parseQuery(schema, { page: '2' });
    expect(first).toEqual({ page: 2, sort: 'a' });
    expect(Object.isFrozen(first)).toBe(true);
    expect(await parseQuery(schema, { page: '2' })).toBe(first);
    expect(await parseQuery(schema, { page: '3' })).toEqual({ page: 3, sort: 'a' });
  });

  it('when the same parameters meet another schema, then that schema judges them', async () => {
    const other = object({ page: number().integer().max(1, 'Only page 1.') });
    await expect(parseQuery(other, { page: '2' })).rejects.toThrow('Only page 1.');
  });

  it('when a refused query comes again, then it is refused again', async () => {
    await expect(parseQuery(schema, { sort: 'z' })).rejects.toThrow();
    await expect(parseQuery(schema, { sort: 'z' })).rejects.toThrow();
    await expect(parseQuery(schema, { page: 'x\u0000' })).rejects.toBeInstanceOf(InputError);
  });

  it('when more distinct queries come than are kept, then every one is still parsed right', async () => {
    for (let page = 1; page <= 1500; page += 1) expect(await parseQuery(schema, { page: String(page) })).toEqual({ page, sort: 'a' });
    expect(await parseQuery(schema, { page: '1' })).toEqual({ page: 1, sort: 'a' });
  });
});
