import type { GlobalThemeOverrides } from 'naive-ui';
import { fontFamily, palette, typeScale } from './palette';

/** naive-ui theme built from Waterline's palette (see DESIGN.md). */
export const themeOverrides: GlobalThemeOverrides = {
  common: {
    fontFamily,
    fontSize: '15px',
    fontSizeMedium: '15px',
    fontSizeLarge: '16px',
    fontWeightStrong: '600',
    lineHeight: '1.5',
    borderRadius: '6px',
    primaryColor: palette.primary,
    primaryColorHover: palette.primaryHover,
    primaryColorPressed: palette.primaryPressed,
    primaryColorSuppl: palette.primaryHover,
    infoColor: palette.info,
    infoColorHover: palette.info,
    infoColorPressed: palette.info,
    successColor: palette.success,
    successColorHover: palette.success,
    successColorPressed: palette.success,
    warningColor: palette.warning,
    warningColorHover: palette.warning,
    warningColorPressed: palette.warning,
    errorColor: palette.error,
    errorColorHover: palette.error,
    errorColorPressed: palette.error,
    textColorBase: palette.ink,
    textColor1: palette.ink,
    textColor2: palette.ink,
    textColor3: palette.inkMuted,
    placeholderColor: palette.inkMuted,
    bodyColor: palette.page,
    cardColor: palette.surface,
    modalColor: palette.surface,
    popoverColor: palette.surface,
    tableColor: palette.surface,
    borderColor: palette.borderStrong,
    dividerColor: palette.border,
  },
  Card: { titleFontSizeMedium: typeScale.h4, borderColor: palette.border },
  DataTable: { thColor: palette.page, thTextColor: palette.ink, thFontWeight: '600', borderColor: palette.border },
  Button: { fontWeight: '500' },
  // A ticked box someone may only read (a manager on the commissioning record) stays readable:
  // naive-ui's own disabled grey is 1.8:1 on white.
  Checkbox: { textColorDisabled: palette.inkMuted },
};
