import { Slot } from 'expo-router';

// The batches tab holds the list, a batch, the start form and the printable report; browser history moves between them.
export default function BatchesLayout() {
  return <Slot />;
}
