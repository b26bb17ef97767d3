import { Link } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import type { Role } from '../../shared/words';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { links } from '../links';

/** The way into the levels board from the job's overview: the GC manager's first thing, a plainer link for others. */
export function BoardLink({ jobId, role }: { jobId: string; role: Role }) {
  const gc = role === 'gc_manager';
  return (
    <Link href={links.board(jobId)} asChild>
      <Pressable style={StyleSheet.flatten([styles.box, gc ? styles.gc : styles.plain])} testID="job-board" accessibilityRole="link">
        <View style={styles.text}>
          <AppText variant="title" style={{ color: gc ? colors.paper : colors.spruce }}>
            Levels board →
          </AppText>
          <AppText variant="small" style={{ color: gc ? colors.spruceSoft : colors.inkMuted }}>
            Open findings per level, ceilings ready to close, systems ready for startup
            {role === 'subcontractor' ? ' (your company’s findings).' : ', and who is holding the job up.'}
          </AppText>
        </View>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  box: { borderRadius: radius.md, padding: space.lg, borderWidth: 1.5 },
  gc: { backgroundColor: colors.spruce, borderColor: colors.spruce },
  plain: { backgroundColor: colors.surface, borderColor: colors.spruce },
  text: { gap: space.xs },
});
