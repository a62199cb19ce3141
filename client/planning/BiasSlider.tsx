// The operating-bias slider. On the web a native range input: it reads the pointer position itself
// (the community slider's web build caches its position and misreads it after the page scrolls), and
// it comes with keyboard steps and touch dragging. Native builds use @react-native-community/slider.
import React, { useEffect, useRef } from 'react';
import { Platform } from 'react-native';
import Slider from '@react-native-community/slider';
import { colors } from '../theme';

interface Props {
  min: number;
  max: number;
  step: number;
  value: number;
  onChange: (v: number) => void;
  /** Pointer down (true) and released (false). */
  onDragging: (dragging: boolean) => void;
  testID?: string;
  label: string;
}

export function BiasSlider({ min, max, step, value, onChange, onDragging, testID, label }: Props) {
  const dragging = useRef(false);
  useEffect(() => {
    if (Platform.OS !== 'web') return;
    // The release may happen outside the input.
    const up = () => {
      if (dragging.current) {
        dragging.current = false;
        onDragging(false);
      }
    };
    window.addEventListener('pointerup', up);
    window.addEventListener('pointercancel', up);
    return () => {
      window.removeEventListener('pointerup', up);
      window.removeEventListener('pointercancel', up);
    };
  }, [onDragging]);

  if (Platform.OS !== 'web') {
    return (
      <Slider
        testID={testID}
        style={{ height: 40 }}
        minimumValue={min}
        maximumValue={max}
        step={step}
        value={value}
        minimumTrackTintColor={colors.accent}
        maximumTrackTintColor={colors.ruleStrong}
        thumbTintColor={colors.accent}
        onSlidingStart={() => onDragging(true)}
        onValueChange={onChange}
        onSlidingComplete={(v: number) => {
          onChange(v);
          onDragging(false);
        }}
        aria-label={label}
      />
    );
  }
  return React.createElement('input', {
    type: 'range',
    'data-testid': testID,
    'aria-label': label,
    min,
    max,
    step,
    value,
    onChange: (e: { target: { value: string } }) => onChange(Number(e.target.value)),
    onPointerDown: () => {
      dragging.current = true;
      onDragging(true);
    },
    style: { width: '100%', height: 40, margin: 0, accentColor: colors.accent, cursor: 'pointer', touchAction: 'none' },
  });
}
