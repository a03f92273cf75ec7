/** Demo data cuts (filled in by its feature). */
import type { Knex } from 'knex';

export async function seedDataCuts(_trx: Knex.Transaction, _trials: Map<string, string>, _today: Date): Promise<void> {}
