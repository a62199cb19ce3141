import React, { useState } from 'react';
import { Pressable, StyleSheet, type PressableProps, type StyleProp, type ViewStyle } from 'react-native';
import { Link, type Href } from 'expo-router';

type StyleArg = StyleProp<ViewStyle> | ((s: { hovered: boolean; pressed: boolean }) => StyleProp<ViewStyle>);

interface PressableLinkProps extends Omit<PressableProps, 'style' | 'children'> {
  href: Href;
  style?: StyleArg;
  children: React.ReactNode;
}

/**
 * A block-level link (renders <a href> on web). Link's asChild slot spreads the child's style,
 * which loses function styles and breaks on style arrays, so hover/press state is tracked here
 * and a flat style object is handed to the Pressable.
 */
export function PressableLink({ href, style, children, ...rest }: PressableLinkProps) {
  const [hovered, setHovered] = useState(false);
  const [pressed, setPressed] = useState(false);
  const flat = StyleSheet.flatten(typeof style === 'function' ? style({ hovered, pressed }) : style) ?? {};
  return (
    <Link href={href} asChild>
      <Pressable
        {...rest}
        onHoverIn={() => setHovered(true)}
        onHoverOut={() => setHovered(false)}
        onPressIn={() => setPressed(true)}
        onPressOut={() => setPressed(false)}
        style={flat}
      >
        {children}
      </Pressable>
    </Link>
  );
}
