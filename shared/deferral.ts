/**
 * The deferral every output ends with (e-mails, PDF reports): Trimout records what people observed;
 * the manual, the codes and licensed practice decide. One wording, so no output drifts. CSV exports
 * stay plain data and do not carry it (the export screen says so).
 */
export const NOT_CERTIFIED = 'Trimout records what people observed; it does not certify an installation.';
export const GOVERNS = "The manufacturer's installation manual, local codes and licensed practice govern.";
/** The closing line of every e-mail. */
export const MAIL_DEFERRAL = `${NOT_CERTIFIED} ${GOVERNS}`;
