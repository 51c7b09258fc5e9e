package wdf

// portVec is a vector of root port values in the array kernels: the
// fixed-size kernel uses its first smallK entries, the mid-size kernel its
// first k ≤ midK. Indices are masked with portMask, so they need no
// bounds check.
type portVec = [midK]float64

// midK is the largest root the mid-size kernel takes.
const midK = 16

const portMask = midK - 1
