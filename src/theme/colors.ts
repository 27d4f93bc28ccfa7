// Yieldpoint's palette: deep slate-teal ink on warm paper, a copper accent for heat, semantic states.
// Every text/background pair used here meets WCAG AA contrast (4.5:1) in both schemes.
export type Palette = {
  background: string;
  surface: string;
  surfaceRaised: string;
  border: string;
  text: string;
  textMuted: string;
  primary: string;
  onPrimary: string;
  accent: string;
  onAccent: string;
  success: string;
  warning: string;
  danger: string;
  onDanger: string;
  focus: string;
  navBackground: string;
  navText: string;
  navActive: string;
  navActiveText: string;
  chartGrid: string;
  chartLine: string;
  chartLineAlt: string;
};

export const light: Palette = {
  background: '#F6F4EF',
  surface: '#FFFFFF',
  surfaceRaised: '#FBFAF7',
  border: '#D9D4C9',
  text: '#1C2630',
  textMuted: '#515D68',
  primary: '#0F4C5C',
  onPrimary: '#FFFFFF',
  accent: '#A4471C',
  onAccent: '#FFFFFF',
  success: '#2D6A3E',
  warning: '#8A5A00',
  danger: '#A3262A',
  onDanger: '#FFFFFF',
  focus: '#1F6FEB',
  navBackground: '#12323C',
  navText: '#D3E0E3',
  navActive: '#E8A35C',
  navActiveText: '#12323C',
  chartGrid: '#E4DFD5',
  chartLine: '#0F4C5C',
  chartLineAlt: '#A4471C',
};

export const dark: Palette = {
  background: '#0F1519',
  surface: '#172127',
  surfaceRaised: '#1D2930',
  border: '#2F3E47',
  text: '#E8EEF0',
  textMuted: '#A6B4BB',
  primary: '#6CC3D5',
  onPrimary: '#0B2229',
  accent: '#F0A46C',
  onAccent: '#2A1406',
  success: '#7BC48E',
  warning: '#E5B454',
  danger: '#F28B86',
  onDanger: '#2A0B0A',
  focus: '#7AB4FF',
  navBackground: '#0A1013',
  navText: '#B6C5CB',
  navActive: '#E8A35C',
  navActiveText: '#0A1013',
  chartGrid: '#27343C',
  chartLine: '#6CC3D5',
  chartLineAlt: '#F0A46C',
};
