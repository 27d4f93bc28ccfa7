import { Slot } from 'expo-router';

// The sign-offs tab holds the list of change requests, one request's record, and a new proposal.
export default function SignOffsLayout() {
  return <Slot />;
}
