import React from 'react';
import { ScrollView, View } from 'react-native';
import { colors, space } from '../theme';
import { Text } from './Text';

/**
 * Wide-screen layout of a section: its list on the left stays put while the detail on the right
 * (the route's `children`, usually <Slot />) changes. testIDs: `${testIDPrefix}-two-pane`, `-list-pane`.
 */
export function ListDetailPanes(props: { title: string; testIDPrefix: string; list: React.ReactNode; children: React.ReactNode }) {
  return (
    <View style={{ flex: 1, flexDirection: 'row', minHeight: 0 }} testID={`${props.testIDPrefix}-two-pane`}>
      <ScrollView
        style={{ width: 380, flexGrow: 0, flexShrink: 0, borderRightWidth: 1, borderRightColor: colors.rule }}
        contentContainerStyle={{ padding: space.xl, gap: space.lg }}
        testID={`${props.testIDPrefix}-list-pane`}
      >
        <Text variant="title" role="heading" aria-level={1}>
          {props.title}
        </Text>
        {props.list}
      </ScrollView>
      <View style={{ flex: 1, minWidth: 0 }}>{props.children}</View>
    </View>
  );
}
