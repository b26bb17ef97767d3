export interface ExportLinkProps {
  /** Same-origin API path of a CSV export (components/api/exports.ts). */
  href: string;
  label: string;
  testID?: string;
}
