package wire

// FastMarshal exposes the hand encoders to the external tests.
var FastMarshal = fastMarshal
