/**
 * Replace the database with a backup. Stop the server first: the restore refuses while another
 * program has the database open.
 *
 *   npm run restore -- <backup file>
 *
 * The backup must pass integrity_check and be an Equilight database; the database it replaces is kept
 * as <DATA_DIR>/backups/before-restore-<UTC time>.sqlite.
 */
import { loadConfig } from '../server/src/config';
import { restoreDatabase } from '../server/src/maintenance/backup';

const file = process.argv[2];
if (!file) {
  console.error('usage: npm run restore -- <backup file>');
  process.exitCode = 2;
} else {
  restoreDatabase(loadConfig(), file).then(
    ({ restored, previousCopy }) => {
      console.log(`Restored ${restored} from ${file}.`);
      if (previousCopy) console.log(`The database it replaced is kept as ${previousCopy}.`);
    },
    (err: unknown) => {
      console.error(err instanceof Error ? err.message : err);
      process.exitCode = 1;
    },
  );
}
