import { Link, type Href } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import type { CaughtMailDto } from '../../shared/schemas/auth';
import { ApiError } from '../api/client';
import { useCaughtMailQuery } from '../queries/auth';
import { colors, fonts, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Card } from '../ui/Card';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { Wordmark } from '../ui/Wordmark';
import { links } from '../links';

/**
 * /mailbox (development only): the mails Trimout sent to its local fake SMTP server, newest
 * first, so invitations, confirmations and resets can be followed without a mail account.
 */
export function MailboxScreen() {
  const mail = useCaughtMailQuery();
  return (
    <Screen testID="mailbox-screen" main>
      <View style={styles.head}>
        <Link href={links.home()} accessibilityLabel="Trimout">
          <Wordmark compact />
        </Link>
        <AppText variant="display" role="heading">
          Caught mail
        </AppText>
        <AppText muted>
          In development Trimout sends its mail to a fake SMTP server on this computer. Nothing leaves it; the last 200 mails
          are kept here until the server stops. The list refreshes every few seconds.
        </AppText>
      </View>
      {mail.isPending ? (
        <LoadingState label="Loading caught mail…" />
      ) : mail.isError ? (
        mail.error instanceof ApiError && mail.error.status === 404 ? (
          <EmptyState
            testID="mailbox-off"
            title="No mailbox here"
            body="This server sends real mail (SMTP_URL is set) or runs in production, so there is no caught mail to show."
          />
        ) : (
          <ErrorState message={mail.error.message} onRetry={() => mail.refetch()} />
        )
      ) : mail.data.items.length === 0 ? (
        <EmptyState testID="mailbox-empty" title="No mail yet" body="Invite someone, sign up or ask for a password reset: the mail shows up here." />
      ) : (
        <View style={styles.list} testID="mailbox-list">
          {mail.data.items.map((m) => (
            <CaughtMailCard key={m.id} mail={m} />
          ))}
        </View>
      )}
    </Screen>
  );
}

/** Same-origin links open inside the app; others as they are. */
function hrefOf(link: string): Href {
  if (typeof window !== 'undefined' && window.location) {
    try {
      const url = new URL(link);
      if (url.origin === window.location.origin) return `${url.pathname}${url.search}` as Href;
    } catch {
      // not a URL: shown as it is
    }
  }
  return link as Href;
}

function CaughtMailCard({ mail }: { mail: CaughtMailDto }) {
  const when = new Date(mail.receivedAt);
  return (
    <Card testID="mail-item">
      <View style={styles.meta}>
        <AppText variant="small" muted>
          To {mail.to.join(', ')}
        </AppText>
        <AppText variant="small" muted>
          {when.toLocaleString()}
        </AppText>
      </View>
      <AppText variant="heading" testID="mail-subject">
        {mail.subject}
      </AppText>
      {mail.links.length ? (
        <View style={styles.links}>
          {mail.links.map((link) => (
            <Link key={link} href={hrefOf(link)} style={styles.link} testID="mail-link">
              {link}
            </Link>
          ))}
        </View>
      ) : null}
      <View style={styles.body}>
        <AppText variant="small" style={styles.bodyText} testID="mail-text" selectable>
          {mail.text}
        </AppText>
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  head: { gap: space.sm },
  list: { gap: space.md },
  meta: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'space-between', gap: space.sm },
  links: { gap: space.xs },
  link: { color: colors.spruce, textDecorationLine: 'underline', fontFamily: fonts.bold, fontSize: 14, wordBreak: 'break-all' } as object,
  body: { backgroundColor: colors.paper, borderRadius: radius.md, padding: space.md },
  bodyText: { color: colors.ink },
});
