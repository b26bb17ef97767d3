import { createElement } from 'react';
import { colors, fonts, radius, space, touchTarget } from '../theme';
import type { ExportLinkProps } from './ExportLink.types';

/**
 * On the web: a plain link to the CSV. The browser sends the session cookie with it (a GET
 * needs no CSRF token) and saves the file under the name the server gives (Content-Disposition).
 * Looks like a secondary button.
 */
export function ExportLink({ href, label, testID }: ExportLinkProps) {
  return createElement(
    'a',
    {
      href,
      download: '',
      'data-testid': testID,
      style: {
        display: 'inline-flex',
        alignItems: 'center',
        justifyContent: 'center',
        alignSelf: 'flex-start',
        minHeight: touchTarget,
        boxSizing: 'border-box',
        padding: `0 ${space.lg}px`,
        borderRadius: radius.md,
        border: `1.5px solid ${colors.spruce}`,
        backgroundColor: colors.surface,
        color: colors.spruce,
        fontFamily: fonts.bold,
        fontSize: 16,
        textDecoration: 'none',
      },
    },
    label,
  );
}
