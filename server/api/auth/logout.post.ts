// Ends this browser's session on the server too, so a copy of its cookie no longer signs anyone in;
// the account's other browsers stay signed in (POST /api/auth/logout-all ends those).
export default defineEventHandler(async (event) => {
  await signOut(event)
  return { signedOut: true }
})
