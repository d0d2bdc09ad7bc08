import { and, desc, eq } from 'drizzle-orm'
import { surfaceTests, users } from '../../../../../db/schema'

/**
 * Listening notes added later, or the verdict overruled (a reason is required and kept). A change of
 * verdict moves the blank only through the latest test of its current surface, and not while held.
 */
export default defineEventHandler(async (event) => {
  const maker = await requireRole(event, 'maker')
  const { code, id } = paramsWith(event, surfaceTestParamsSchema)
  const patch = await readBodyWith(event, surfaceTestPatchSchema)
  const db = await useDB()
  const updated = await db.transaction(async (tx) => {
    const blank = await lockBlankByCode(tx, code)
    const [test] = await tx.select().from(surfaceTests).where(and(eq(surfaceTests.id, id), eq(surfaceTests.blankId, blank.id))).limit(1)
    if (!test) throw createError({ statusCode: 404, statusMessage: 'Not found', message: `Blank ${code} has no surface test #${id}.` })
    if (test.computedVerdict === 'incomplete' && patch.finalVerdict !== undefined) {
      throw fieldError('finalVerdict', 'an incomplete play-through cannot be overruled: test the surface again, playing it through to the end')
    }
    const finalVerdict = patch.finalVerdict ?? test.finalVerdict
    const overruled = test.computedVerdict !== 'incomplete' && finalVerdict !== 'incomplete' && isSurfaceOverrule(test.computedVerdict, finalVerdict)
    const reason = patch.overruleReason === undefined ? test.overruleReason : patch.overruleReason
    if (overruled && !reason) throw fieldError('overruleReason', SURFACE_OVERRULE_REASON_REQUIRED)

    if (finalVerdict !== test.finalVerdict) {
      const [latest] = await tx.select({ id: surfaceTests.id }).from(surfaceTests)
        .where(and(eq(surfaceTests.blankId, blank.id), eq(surfaceTests.surface, blankCurrentSurface(blank.surfacesUsed))))
        .orderBy(desc(surfaceTests.testedAt), desc(surfaceTests.id)).limit(1)
      if (latest?.id !== test.id) {
        throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `${code}: test #${id} is not the latest test of the blank's current surface, so its verdict no longer decides anything; its notes can still be changed.` })
      }
      await assertBlankAction(tx, blank, 'surfaceTest')
      await changeBlank(tx, blank, { state: blankStateAfterTest(finalVerdict as 'pass' | 'fail') }, `surface ${test.surface}: verdict changed to ${finalVerdict}${overruled ? ` (overruled: ${reason})` : ''}`, maker.id)
    }
    const [row] = await tx.update(surfaceTests).set({
      listeningNotes: patch.listeningNotes ?? test.listeningNotes,
      finalVerdict,
      // The reason belongs to an overrule; going back to the computed verdict clears it (the log keeps it).
      overruleReason: overruled ? reason : null,
    }).where(eq(surfaceTests.id, test.id)).returning()
    return row!
  })
  const [tester] = updated.testedBy === maker.id ? [{ name: maker.name }] : await db.select({ name: users.name }).from(users).where(eq(users.id, updated.testedBy ?? 0))
  return surfaceTestView(updated, tester?.name ?? null)
})
