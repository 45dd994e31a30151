/** The cellar operations screens' URLs. */
export const cellarPaths = {
  sanitation: '/sanitation',
  sanitationLog: '/sanitation/log',
  sanitationAudit: '/sanitation/audit',
  recordCycle: (equipmentId?: string) => (equipmentId ? `/sanitation/new?equipmentId=${encodeURIComponent(equipmentId)}` : '/sanitation/new'),
  kegs: '/kegs',
  overdue: '/kegs/overdue',
  tapBoard: '/kegs/tap-board',
  keg: (id: string) => `/kegs/${encodeURIComponent(id)}`,
  carbonation: (kegId: string) => `/kegs/${encodeURIComponent(kegId)}/carbonation`,
  newTransfer: (q: { kegIds?: string[]; batchId?: string } = {}) => {
    const params = new URLSearchParams();
    if (q.kegIds?.length) params.set('kegIds', q.kegIds.join(','));
    if (q.batchId) params.set('batchId', q.batchId);
    const s = params.toString();
    return s ? `/transfers/new?${s}` : '/transfers/new';
  },
};
