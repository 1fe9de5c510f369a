package app

import (
	"bytes"
	"compress/flate"
	"encoding/base64"
	"errors"
	"fmt"
	"io"
	"strings"
)

// FragmentKey starts the URL fragment that carries a shared recipe: "#r=…".
// A fragment is never sent to any server, so the link shares the settings
// and nothing else (never the data).
const FragmentKey = "r="

// RunSuffix after a shared recipe asks the page to run it as soon as a
// recording is ready: "#r=…&run".
const RunSuffix = "&run"

// maxRecipe bounds an inflated recipe, so a hostile link cannot exhaust
// memory.
const maxRecipe = 1 << 20

// EncodeFragment compresses recipe JSON with DEFLATE (RFC 1951, best
// compression) and encodes it base64url without padding (RFC 4648 §5),
// returning "r=<data>" for the URL fragment.
func EncodeFragment(recipeJSON []byte) string {
	var b bytes.Buffer
	w, err := flate.NewWriter(&b, flate.BestCompression)
	if err != nil {
		panic("app: " + err.Error())
	}
	w.Write(recipeJSON)
	w.Close()
	return FragmentKey + base64.RawURLEncoding.EncodeToString(b.Bytes())
}

// ErrNoRecipe says a fragment holds no shared recipe.
var ErrNoRecipe = errors.New("no shared recipe in the link")

// DecodeFragment reverses EncodeFragment. It accepts the fragment with or
// without its leading '#'.
func DecodeFragment(frag string) ([]byte, error) {
	frag = strings.TrimPrefix(frag, "#")
	if !strings.HasPrefix(frag, FragmentKey) {
		return nil, ErrNoRecipe
	}
	data := strings.TrimPrefix(frag, FragmentKey)
	raw, err := base64.RawURLEncoding.DecodeString(data)
	if err != nil {
		return nil, fmt.Errorf("shared link: %w", err)
	}
	r := flate.NewReader(bytes.NewReader(raw))
	defer r.Close()
	out, err := io.ReadAll(io.LimitReader(r, maxRecipe+1))
	if err != nil {
		return nil, fmt.Errorf("shared link: %w", err)
	}
	if len(out) > maxRecipe {
		return nil, fmt.Errorf("shared link: recipe longer than %d bytes", maxRecipe)
	}
	return out, nil
}
