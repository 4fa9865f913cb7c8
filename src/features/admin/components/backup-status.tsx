import { useQuery } from '@tanstack/react-query';
import { Alert } from '../../../components/ui/alert';
import { adminQueries } from '../api';

/** One line above the jobs: the last good backup, or a warning when it failed or is missing. */
export function BackupStatusLine() {
  const { data } = useQuery(adminQueries.backupStatus());
  if (!data) return null;
  const last = data.lastGood
    ? `Last good backup ${new Date(data.lastGood.at).toLocaleString()}: ${data.lastGood.summary ?? ''}`
    : 'No backup has succeeded yet.';
  if (data.failedSince) {
    return (
      <Alert
        tone="error"
        title="Backup failed"
      >{`${new Date(data.failedSince.at).toLocaleString()}: ${data.failedSince.error ?? 'no message'}. ${last}`}</Alert>
    );
  }
  if (data.missing) {
    return (
      <Alert
        tone="caution"
        title="Backup missing"
      >{`No successful backup in the last ${data.missingAfterHours} hours. ${last} Run “nightly-backup” below, or “npm run backup” on the server.`}</Alert>
    );
  }
  return <Alert tone="success">{`${last} (${data.onDisk} backups in ${data.backupDir}).`}</Alert>;
}
