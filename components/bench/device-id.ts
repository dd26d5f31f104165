// This phone's own id, kept in localStorage: the server tells one phone's sessions from another's by it.
export function deviceId(): string {
  const key = "grindfade-device";
  let id = localStorage.getItem(key);
  if (!id) {
    id = crypto.randomUUID();
    localStorage.setItem(key, id);
  }
  return id;
}
