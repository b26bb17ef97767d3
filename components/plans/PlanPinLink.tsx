import { Link } from 'expo-router';
import { StyleSheet } from 'react-native';
import { colors, linkTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { links, type PlaceKind } from '../links';

/**
 * The way from a finding or a unit to its level's plan: "Place on plan" / "Move on plan" for
 * those who may pin it, "Show on plan" for everyone else once it is pinned.
 */
export function PlanPinLink({
  jobId,
  levelId,
  kind,
  id,
  pinned,
  canPlace,
  testID,
}: {
  jobId: string;
  levelId: string;
  kind: PlaceKind;
  id: string;
  pinned: boolean;
  canPlace: boolean;
  testID?: string;
}) {
  if (!canPlace && !pinned) return null;
  const label = canPlace ? (pinned ? 'Move on the plan' : 'Place on the plan') : 'Show on the plan';
  return (
    <Link href={links.plan(jobId, levelId, canPlace ? { kind, id } : undefined)} style={styles.link} testID={testID}>
      <AppText variant="label" style={{ color: colors.spruce }}>
        {`${label} →`}
      </AppText>
    </Link>
  );
}

/** "Plan of Level 3" from a level's screens. */
export function LevelPlanLink({ jobId, levelId, levelName, testID }: { jobId: string; levelId: string; levelName: string; testID?: string }) {
  return (
    <Link href={links.plan(jobId, levelId)} style={styles.link} testID={testID}>
      <AppText variant="label" style={{ color: colors.spruce }}>
        {`Plan of ${levelName} →`}
      </AppText>
    </Link>
  );
}

const styles = StyleSheet.create({
  link: linkTarget,
});
