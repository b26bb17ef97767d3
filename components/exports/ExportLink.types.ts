export interface ExportLinkProps {
  /** Same-origin API path of a CSV export (components/exports/hrefs.ts). */
  href: string;
  label: string;
  testID?: string;
}
