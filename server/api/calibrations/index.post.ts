import { CalibrationBody } from '#shared/bake/schemas'
import { recordCalibration } from '../../domain/calibration'

// A sensor calibration: reference instrument against the booth sensor → offset applied from its effective time.
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, RECORDERS)
  const body = await parseBody(event, CalibrationBody)
  try {
    const r = await recordCalibration(useDb(), user, body)
    setResponseStatus(event, 201)
    return r
  } catch (e) {
    asHttpError(e)
  }
})
