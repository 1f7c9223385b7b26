package assess

import (
	"bytes"
	"encoding/json"
	"fmt"
	"io"
)

// EncodeAssessment writes a as the one JSON form of an assessment: an
// object indented by two spaces, HTML characters left as they are (so a
// threshold such as "< 1" reads as written), and a final newline. It is the
// only encoder of an Assessment: `aloft assess --json` and the web API's
// GET /api/v1/patients/{case}/assessment both call it, so the same
// assessment gives the same bytes on either side. An assessment holding a
// number JSON cannot carry (NaN, ±Inf; Evaluate never makes one) is an
// error, and then nothing is written.
func EncodeAssessment(w io.Writer, a Assessment) error {
	// Encode into memory first: a failing value must not leave half an
	// object on w.
	var buf bytes.Buffer
	enc := json.NewEncoder(&buf)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	if err := enc.Encode(a); err != nil {
		return fmt.Errorf("assess: encode assessment: %w", err)
	}
	if _, err := w.Write(buf.Bytes()); err != nil {
		return fmt.Errorf("assess: write assessment: %w", err)
	}
	return nil
}
