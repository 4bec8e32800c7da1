import { Matrix } from "ml-matrix";
import { realSchur } from "../../shared-engine/linalg";
import { randomMatrix, seededRandom } from "./harness";
for (const n of [10, 20, 50, 100, 200]) {
  const rand = seededRandom(1000 + n);
  const A = randomMatrix(n, n, rand);
  console.log(n, realSchur(new Matrix(A)).iterations);
}
