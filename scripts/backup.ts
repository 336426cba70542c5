/**
 * Back up the SQLite database while the server runs (SQLite's online backup API).
 *
 *   npm run backup [-- <target file>]
 *
 * Without a target the copy goes to <DATA_DIR>/backups/equilight-<UTC time>.sqlite. The copy is
 * checked with integrity_check. The raw-file archive is not in it: the folder <DATA_DIR>/archive is plain
 * files (copy it with the usual tools); with ARCHIVE_URL=s3://… the files are in that bucket (use the
 * storage's own versioning or replication).
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
