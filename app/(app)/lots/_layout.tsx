import { Slot } from 'expo-router';

// The lots tab holds the list, a lot's detail and the enzyme library; the browser's history moves between them.
export default function LotsLayout() {
  return <Slot />;
}
