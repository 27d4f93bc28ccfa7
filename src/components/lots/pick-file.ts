import * as DocumentPicker from 'expo-document-picker';

/** Lets the user choose one file; on the web the browser's File comes back for a multipart upload. */
export async function pickFile(types: string[]): Promise<{ file: Blob; name: string } | null> {
  const r = await DocumentPicker.getDocumentAsync({ type: types, base64: false, copyToCacheDirectory: false, multiple: false });
  if (r.canceled || !r.assets[0]) return null;
  const asset = r.assets[0];
  if (asset.file) return { file: asset.file, name: asset.name };
  // Native: read the picked file's URI into a Blob.
  const blob = await (await fetch(asset.uri)).blob();
  return { file: blob, name: asset.name };
}
