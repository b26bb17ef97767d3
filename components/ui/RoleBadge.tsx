import { StyleSheet, View } from 'react-native';
import { ROLE_LABELS, type Role } from '../../shared/words';
import { colors, radius, space } from '../theme';
import { AppText } from './AppText';

const palette: Record<Role, { bg: string; fg: string }> = {
  gc_manager: { bg: colors.spruce, fg: colors.paper },
  inspector: { bg: colors.ochreSoft, fg: '#5A3B00' },
  subcontractor: { bg: colors.spruceSoft, fg: colors.spruce },
};

export function RoleBadge({ role, testID }: { role: Role; testID?: string }) {
  const c = palette[role];
  return (
    <View style={[styles.badge, { backgroundColor: c.bg }]} testID={testID}>
      <AppText variant="label" style={{ color: c.fg }}>
        {ROLE_LABELS[role]}
      </AppText>
    </View>
  );
}

const styles = StyleSheet.create({
  badge: { alignSelf: 'flex-start', borderRadius: radius.sm, paddingHorizontal: space.sm, paddingVertical: 2 },
});
