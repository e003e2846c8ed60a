/**
 * An implementation of ODEX, by E. Hairer and G. Wanner, ported from the Fortran ODEX.F.
 * The original work carries the BSD 2-clause license, and so does this.
 *
 * Copyright (c) 2016 Colin Smith.
 * 1. Redistributions of source code must retain the above copyright notice, this list of conditions and the following
 * disclaimer.
 * 2. Redistributions in binary form must reproduce the above copyright notice, this list of conditions and the
 * following disclaimer in the documentation and/or other materials provided with the distribution.
 *
 * THIS SOFTWARE IS PROVIDED BY THE COPYRIGHT HOLDERS AND CONTRIBUTORS "AS IS" AND ANY EXPRESS OR IMPLIED WARRANTIES,
 * INCLUDING, BUT NOT LIMITED TO, THE IMPLIED WARRANTIES OF MERCHANTABILITY AND FITNESS FOR A PARTICULAR PURPOSE
 * ARE DISCLAIMED. IN NO EVENT SHALL THE COPYRIGHT HOLDER OR CONTRIBUTORS BE LIABLE FOR ANY DIRECT, INDIRECT,
 * INCIDENTAL, SPECIAL, EXEMPLARY, OR CONSEQUENTIAL DAMAGES (INCLUDING, BUT NOT LIMITED TO, PROCUREMENT OF SUBSTITUTE
 * GOODS OR SERVICES; LOSS OF USE, DATA, OR PROFITS; OR BUSINESS INTERRUPTION) HOWEVER CAUSED AND ON ANY THEORY OF
 * LIABILITY, WHETHER IN CONTRACT, STRICT LIABILITY, OR TORT (INCLUDING NEGLIGENCE OR OTHERWISE) ARISING IN ANY WAY
 * OUT OF THE USE OF THIS SOFTWARE, EVEN IF ADVISED OF THE POSSIBILITY OF SUCH DAMAGE.
 */
export interface Derivative {
    (x: number, // input x value
    y: number[]): number[];
}
export interface OutputFunction {
    (nr: number, // step number
    xold: number, // left edge of solution interval
    x: number, // right edge of solution interval (y = F(x))
    y: number[], // F(x)
    dense?: (c: number, x: number) => number): boolean | void;
}
export declare enum Outcome {
    Converged = 0,
    MaxStepsExceeded = 1,
    EarlyReturn = 2
}
export declare class Solver {
    n: number;
    uRound: number;
    maxSteps: number;
    initialStepSize: number;
    maxStepSize: number;
    maxExtrapolationColumns: number;
    stepSizeSequence: number;
    stabilityCheckCount: number;
    stabilityCheckTableLines: number;
    denseOutput: boolean;
    denseOutputErrorEstimator: boolean;
    denseComponents: number[];
    interpolationFormulaDegree: number;
    stepSizeReductionFactor: number;
    stepSizeFac1: number;
    stepSizeFac2: number;
    stepSizeFac3: number;
    stepSizeFac4: number;
    stepSafetyFactor1: number;
    stepSafetyFactor2: number;
    relativeTolerance: number | number[];
    absoluteTolerance: number | number[];
    debug: boolean;
    constructor(n: number);
    grid(dt: number, out: (xOut: number, yOut: number[]) => any): OutputFunction;
    private static dim;
    private static log10;
    private static dim2;
    static stepSizeSequence(nSeq: number, n: number): number[];
    solve(f: Derivative, x: number, y0: number[], xEnd: number, solOut?: OutputFunction): {
        y: number[];
        outcome: Outcome;
        nStep: number;
        xEnd: number;
        nAccept: number;
        nReject: number;
        nEval: number;
    };
}
