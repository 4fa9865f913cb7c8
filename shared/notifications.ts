/** The notifications Kerfwise sends; each user may turn any of them off. */
export const notificationKinds = [
  { key: 'stop_proposed', label: 'A stop is proposed by the nightly forecast', roles: ['planner'] },
  { key: 'stop_published', label: 'A stop I am on is scheduled or changed', roles: ['fitter', 'planner', 'site_manager'] },
  { key: 'stop_reminder', label: 'Reminders before a stop I am on (24 h and 2 h ahead)', roles: ['fitter', 'planner'] },
  { key: 'parts_digest', label: 'Weekly parts order suggestions', roles: ['buyer'] },
  { key: 'downtime_digest', label: 'Weekly downtime summary', roles: ['site_manager'] },
] as const;
export type NotificationKind = (typeof notificationKinds)[number]['key'];
export const notificationKeys = notificationKinds.map((k) => k.key) as [NotificationKind, ...NotificationKind[]];
