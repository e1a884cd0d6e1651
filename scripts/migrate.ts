/** `npm run migrate` (up) and `npm run migrate:down` (one step down). */
import { closeDb, db } from '../src/lib/server/db';
import { createMigrator } from '../src/lib/server/db/migrator';

const migrator = createMigrator(db());
const done = process.argv[2] === 'down' ? await migrator.down() : await migrator.up();
console.log(`${process.argv[2] === 'down' ? 'Reverted' : 'Applied'} ${done.length} migration(s).`);
await closeDb();
