import { useEffect, useRef } from 'react';
import { Alert, BackHandler } from 'react-native';

/** Native builds: the hardware Back button asks first while `active` (see leaveGuard.web.ts). */
export function useLeaveGuard(active: boolean, message: string, onLeave?: () => void): void {
  const text = useRef(message);
  const leave = useRef(onLeave);
  useEffect(() => {
    text.current = message;
    leave.current = onLeave;
  }, [message, onLeave]);
  useEffect(() => {
    if (!active) return;
    const sub = BackHandler.addEventListener('hardwareBackPress', () => {
      Alert.alert('Leave this check?', text.current, [
        { text: 'Stay', style: 'cancel' },
        { text: 'Leave', style: 'destructive', onPress: () => leave.current?.() },
      ]);
      return true;
    });
    return () => sub.remove();
  }, [active]);
}

/** Asks before an in-app link leaves the page. */
export function confirmLeave(message: string): Promise<boolean> {
  return new Promise((resolve) =>
    Alert.alert('Leave this check?', message, [
      { text: 'Stay', style: 'cancel', onPress: () => resolve(false) },
      { text: 'Leave', style: 'destructive', onPress: () => resolve(true) },
    ]),
  );
}
