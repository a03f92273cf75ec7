/** Demo designs (filled in by its feature). */
import type { Knex } from 'knex';

export async function seedDesigns(_trx: Knex.Transaction, _trials: Map<string, string>, _today: Date): Promise<void> {}
