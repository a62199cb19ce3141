import React from 'react';
import { Slot } from 'expo-router';

// Signed-out screens share no chrome beyond their own AuthFrame; a signed-in visitor may still
// open an invitation or reset link (e.g. to hand the device over to a colleague).
export default function AuthLayout() {
  return <Slot />;
}
