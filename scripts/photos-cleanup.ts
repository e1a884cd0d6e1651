/**
 * `npm run photos:cleanup`: delete from the photo store the objects of photos removed more
 * than 30 days ago, once, now (the app processes also do it hourly). Uses the database and
 * the S3_* settings of the environment.
 */
import { closeDb } from '../src/lib/server/db';
import { purgeRemovedPhotos } from '../src/lib/server/photos/service';

let total = 0;
for (let n = await purgeRemovedPhotos(); n > 0; n = await purgeRemovedPhotos()) total += n;
console.log(`Photo cleanup: ${total} removed photo(s) deleted from storage.`);
await closeDb();
