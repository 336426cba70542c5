/**
 * Back up the SQLite database while the server runs (SQLite's online backup API).
 *
 *   npm run backup [-- <target file>]
 *
 * Without a target the copy goes to <DATA_DIR>/backups/equilight-<UTC time>.sqlite. The copy is
 * checked with integrity_check; the raw-file archive (<DATA_DIR>/archive) is plain files: copy that
 * folder with the usual tools.
 */
import { loadConfig } from '../server/src/config';
import { backupDatabase } from '../server/src/maintenance/backup';

backupDatabase(loadConfig(), process.argv[2]).then(
  (file) => console.log(`Backed up to ${file}`),
  (err: unknown) => {
    console.error(err instanceof Error ? err.message : err);
    process.exitCode = 1;
  },
);
