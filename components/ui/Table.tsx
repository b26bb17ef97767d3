import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, radius, space } from '../theme';
import { AppText } from './AppText';

export interface Column<T> {
  key: string;
  title: string;
  /** Relative width (flex). */
  flex?: number;
  render: (row: T) => ReactNode;
}

/** A plain table for wide screens. Phones get cards instead (the screen decides). */
export function Table<T>({
  columns,
  rows,
  rowKey,
  testID,
  rowTestID,
}: {
  columns: readonly Column<T>[];
  rows: readonly T[];
  rowKey: (row: T) => string;
  testID?: string;
  rowTestID?: (row: T) => string;
}) {
  return (
    <View style={styles.table} testID={testID} role="table">
      <View style={[styles.row, styles.head]} role="row">
        {columns.map((c) => (
          <View key={c.key} style={[styles.cell, { flex: c.flex ?? 1 }]} role="columnheader">
            <AppText variant="label" muted>
              {c.title}
            </AppText>
          </View>
        ))}
      </View>
      {rows.map((row, i) => (
        <View
          key={rowKey(row)}
          style={[styles.row, i % 2 === 1 ? styles.zebra : null]}
          role="row"
          testID={rowTestID ? rowTestID(row) : undefined}
        >
          {columns.map((c) => {
            const content = c.render(row);
            return (
              <View key={c.key} style={[styles.cell, { flex: c.flex ?? 1 }]} role="cell">
                {typeof content === 'string' || typeof content === 'number' ? <AppText>{content}</AppText> : content}
              </View>
            );
          })}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  table: { borderWidth: 1, borderColor: colors.line, borderRadius: radius.md, backgroundColor: colors.surface, overflow: 'hidden' },
  row: { flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: colors.line, alignItems: 'center' },
  head: { backgroundColor: colors.paper },
  zebra: { backgroundColor: '#FAF8F3' },
  cell: { paddingHorizontal: space.md, paddingVertical: space.sm, minWidth: 0 },
});
