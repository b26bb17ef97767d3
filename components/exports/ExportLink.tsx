import { Linking } from 'react-native';
import { Button } from '../ui/Button';
import type { ExportLinkProps } from './ExportLink.types';

/** Off the web: opens the CSV's address in the system browser (the web app is the supported client). */
export function ExportLink({ href, label, testID }: ExportLinkProps) {
  return <Button label={label} tone="secondary" testID={testID} onPress={() => void Linking.openURL(href)} />;
}
