import { MailboxScreen } from '../components/dev/MailboxScreen';

/** Development only: mails caught by the local fake SMTP server (the API answers 404 otherwise). */
export default function MailboxRoute() {
  return <MailboxScreen />;
}
