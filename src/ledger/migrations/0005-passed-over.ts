/**
 * Migration 5: what a scan passed over. Every entry under a scanned folder that is neither
 * screened nor an error (a file that is not media, a hidden or system file, a FIFO or a folder
 * named like a photo, a broken link, a folder that could not be listed) is kept here with its
 * reason (media/find-media.ts SkipReason), replaced per root by each scan, so the report
 * accounts for every path.
 */
export const sql = `
CREATE TABLE scan_skipped (
  root_id INTEGER NOT NULL REFERENCES roots(id),
  rel_path TEXT NOT NULL,
  reason TEXT NOT NULL,
  PRIMARY KEY (root_id, rel_path)
);
`;
