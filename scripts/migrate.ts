/** Applies pending migrations to the database named by the environment (see README, Configuration). */
import { loadConfig } from '../server/config';
import { createSequelize, migrateUp } from '../server/db/database';

const sequelize = createSequelize(loadConfig());
const applied = await migrateUp(sequelize);
console.log(applied.length ? `Applied: ${applied.join(', ')}` : 'Nothing to apply; the schema is up to date.');
await sequelize.close();
